// Single-use, expiring links for invitations and password resets. The link carries 32 random bytes; the
// database keeps only their SHA-256, so reading the table does not give anyone a working link. Issuing a
// new token of a purpose voids the person's earlier open ones of that purpose.
import { hashSecretToken, newSecretToken } from '@/lib/auth/secret-token';
import type { Knex } from 'knex';
import { z } from 'zod';
import { db } from '@/lib/db';
import { recordAudit } from '@/lib/audit';
import { ApiError } from '@/lib/http';
import { hashPassword, passwordSchema } from '@/lib/auth/passwords';
import type { UserRow } from '@/lib/people';

export type TokenPurpose = 'invite' | 'reset';

export const TOKEN_LIFETIME_MINUTES: Record<TokenPurpose, number> = {
  invite: 7 * 24 * 60, // a week to accept an invitation
  reset: 60, // an hour to use a reset link
};

export const tokenSchema = z
  .string({ error: 'The link token is missing.' })
  .regex(/^[A-Za-z0-9_-]{43}$/, 'The link is not a Modeshelf link (malformed token).');

export const redeemSchema = z.object({ token: tokenSchema, password: passwordSchema });

export async function issueToken(
  trx: Knex.Transaction,
  userId: string,
  purpose: TokenPurpose,
  createdBy: string | null,
  now = new Date(),
): Promise<string> {
  const token = newSecretToken();
  await trx('auth_tokens').where({ user_id: userId, purpose }).whereNull('used_at').delete();
  await trx('auth_tokens').insert({
    user_id: userId,
    purpose,
    token_hash: hashSecretToken(token),
    expires_at: new Date(now.getTime() + TOKEN_LIFETIME_MINUTES[purpose] * 60_000),
    created_by: createdBy,
  });
  return token;
}

export interface TokenInfo {
  purpose: TokenPurpose;
  email: string;
  name: string;
}

type TokenState =
  | { valid: true; info: TokenInfo; tokenId: string; user: UserRow }
  | { valid: false; code: 'unknown' | 'used' | 'expired' | 'deactivated'; message: string };

async function lookUp(trx: Knex | Knex.Transaction, token: string, lock: boolean, now: Date): Promise<TokenState> {
  const query = trx('auth_tokens').where({ token_hash: hashSecretToken(token) }).first();
  const row = lock ? await query.forUpdate() : await query;
  if (!row) {
    return { valid: false, code: 'unknown', message: 'This link is not valid. It may have been replaced by a newer one.' };
  }
  if (row.used_at) return { valid: false, code: 'used', message: 'This link has already been used; each link works once.' };
  if (row.expires_at <= now) {
    return { valid: false, code: 'expired', message: 'This link has expired. Ask an admin to send a new one.' };
  }
  const user = await trx<UserRow>('users').where({ id: row.user_id }).first();
  if (!user || (row.purpose === 'reset' && !user.active)) {
    return { valid: false, code: 'deactivated', message: 'This account has been deactivated.' };
  }
  return { valid: true, tokenId: String(row.id), user, info: { purpose: row.purpose, email: user.email, name: user.name } };
}

/** For the invitation and reset pages: whose link this is, or why it no longer works. Changes nothing. */
export async function inspectToken(token: string, now = new Date()): Promise<TokenState> {
  if (!tokenSchema.safeParse(token).success) {
    return { valid: false, code: 'unknown', message: 'This link is not valid.' };
  }
  return lookUp(db(), token, false, now);
}

/** Sets the password and spends the token, in one transaction. Returns the account's e-mail. */
export async function redeemToken(token: string, password: string, now = new Date()): Promise<TokenInfo> {
  const passwordHash = await hashPassword(password);
  return db().transaction(async (trx) => {
    const state = await lookUp(trx, token, true, now);
    if (!state.valid) throw new ApiError(410, `token_${state.code}`, state.message, 'token');
    await trx('auth_tokens').where({ id: state.tokenId }).update({ used_at: now });
    await trx('users')
      .where({ id: state.user.id })
      .update({ password_hash: passwordHash, updated_at: trx.fn.now() });
    await recordAudit(trx, {
      actorId: null,
      action: state.info.purpose === 'invite' ? 'user.invitation_accepted' : 'user.password_reset',
      subjectType: 'user',
      subjectId: state.user.id,
      details: {},
    });
    return state.info;
  });
}
