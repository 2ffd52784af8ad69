// Checking a sign-in, with rate limiting of failures per account and per client address.
//
// Limits (common practice, no single source): within a 15-minute window, 5 failures for one account or 20
// from one address stop further tries for that account or from that address until the oldest counted
// failure leaves the window. Each limit is scoped: other accounts and other addresses carry on, so one
// attacker cannot shut everybody out. A successful sign-in clears the account's count. Refused tries are
// not recorded, so waiting out the window always works.
import { db } from '@/lib/db';
import type { Role } from '@/lib/roles';
import { verifyPassword } from '@/lib/auth/passwords';
import { findUserByEmail } from '@/lib/people';

export const SIGN_IN_LIMITS = {
  windowMinutes: 15,
  failuresPerAccount: 5,
  failuresPerAddress: 20,
} as const;

export interface SignedInUser {
  id: string;
  email: string;
  name: string;
  role: Role;
}

export type SignInFailure = 'invalid_credentials' | 'deactivated' | 'rate_limited_account' | 'rate_limited_address';

export type SignInResult = { ok: true; user: SignedInUser } | { ok: false; reason: SignInFailure; message: string };

export interface SignInAttempt {
  email: string;
  password: string;
  address: string;
  now?: Date; // for tests of the window; the database clock is not used so the two cannot disagree
}

const minutes = (n: number) => n * 60_000;

async function countedFailures(
  column: 'email' | 'address',
  value: string,
  since: Date,
): Promise<{ count: number; oldest: Date | null }> {
  const knex = db();
  let sinceForKey = since;
  if (column === 'email') {
    const lastSuccess = await knex('sign_in_attempts')
      .where({ email: value, succeeded: true })
      .andWhere('at', '>=', since)
      .max<{ max: Date | null }>('at as max')
      .first();
    if (lastSuccess?.max && lastSuccess.max > sinceForKey) sinceForKey = lastSuccess.max;
  }
  const row = await knex('sign_in_attempts')
    .where({ [column]: value, succeeded: false })
    .andWhere('at', '>', sinceForKey)
    .first<{ count: number; oldest: Date | null }>(knex.raw('count(*)::int AS count'), knex.raw('min(at) AS oldest'));
  return { count: row?.count ?? 0, oldest: row?.oldest ?? null };
}

function waitMessage(oldest: Date | null, now: Date): string {
  const until = oldest ? oldest.getTime() + minutes(SIGN_IN_LIMITS.windowMinutes) : now.getTime();
  const wait = Math.max(1, Math.ceil((until - now.getTime()) / 60_000));
  return `Try again in ${wait} minute${wait === 1 ? '' : 's'}`;
}

export async function checkSignIn(attempt: SignInAttempt): Promise<SignInResult> {
  const now = attempt.now ?? new Date();
  const email = attempt.email.trim().toLowerCase();
  const address = attempt.address || 'unknown';
  const windowStart = new Date(now.getTime() - minutes(SIGN_IN_LIMITS.windowMinutes));

  const byAccount = await countedFailures('email', email, windowStart);
  if (byAccount.count >= SIGN_IN_LIMITS.failuresPerAccount) {
    return {
      ok: false,
      reason: 'rate_limited_account',
      message: `Too many failed sign-ins for this account. ${waitMessage(byAccount.oldest, now)}, or ask an admin to send you a password reset link.`,
    };
  }
  const byAddress = await countedFailures('address', address, windowStart);
  if (byAddress.count >= SIGN_IN_LIMITS.failuresPerAddress) {
    return {
      ok: false,
      reason: 'rate_limited_address',
      message: `Too many failed sign-ins from your network address. ${waitMessage(byAddress.oldest, now)}.`,
    };
  }

  const user = await findUserByEmail(email);
  const passwordOk = await verifyPassword(attempt.password, user?.password_hash ?? null);
  await db()('sign_in_attempts').insert({ email, address, succeeded: passwordOk, at: now });
  if (!user || !passwordOk) {
    return { ok: false, reason: 'invalid_credentials', message: 'Wrong e-mail or password.' };
  }
  if (!user.active) {
    return {
      ok: false,
      reason: 'deactivated',
      message: 'This account has been deactivated. Ask an admin of your Modeshelf to reactivate it.',
    };
  }
  await db()('users').where({ id: user.id }).update({ last_signed_in_at: now });
  return { ok: true, user: { id: user.id, email: user.email, name: user.name, role: user.role } };
}
