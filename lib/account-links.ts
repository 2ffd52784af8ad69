// Invitations and password resets: issue a single-use token (lib/auth/tokens.ts), mail its link through
// the fake SMTP, record the act. The database work commits before the mail goes out, so a mail failure
// never leaves a half-made account; the admin can simply send the link again.
import { db } from '@/lib/db';
import { appUrl } from '@/lib/config';
import { recordAudit } from '@/lib/audit';
import { ApiError } from '@/lib/http';
import { ROLE_LABELS } from '@/lib/roles';
import { createInvitedUser, findUserByEmail, findUserById, toPerson, type InviteInput, type Person } from '@/lib/people';
import { issueToken, TOKEN_LIFETIME_MINUTES } from '@/lib/auth/tokens';
import { sendMail } from '@/lib/mail/transport';
import { invitationMail, passwordResetMail } from '@/lib/mail/templates';

export interface LinkSent {
  person: Person;
  mailSent: boolean;
  message: string;
}

// A person asking for reset links for themselves (the Forgot password page) gets at most this many an hour;
// common practice against using the form to flood someone's inbox.
export const SELF_SERVICE_RESETS_PER_HOUR = 3;

async function deliver(mail: Parameters<typeof sendMail>[0]): Promise<boolean> {
  try {
    await sendMail(mail);
    return true;
  } catch (err) {
    console.error('[modeshelf] mail could not be sent', err);
    return false;
  }
}

export async function invitePerson(input: InviteInput, actor: { id: string; name: string }): Promise<LinkSent> {
  const { row, token } = await db().transaction(async (trx) => {
    const created = await createInvitedUser(trx, input, actor.id);
    return { row: created, token: await issueToken(trx, created.id, 'invite', actor.id) };
  });
  const mailSent = await deliver({
    to: row.email,
    ...invitationMail({
      name: row.name,
      inviterName: actor.name,
      role: ROLE_LABELS[row.role].toLowerCase(),
      url: `${appUrl()}/invite/${token}`,
      days: TOKEN_LIFETIME_MINUTES.invite / (24 * 60),
    }),
  });
  return {
    person: toPerson(row),
    mailSent,
    message: mailSent
      ? `Invitation sent to ${row.email}.`
      : `${row.email} was invited, but the mail could not be sent; use "Send invitation again".`,
  };
}

async function mailResetLink(userId: string, createdBy: string | null): Promise<LinkSent> {
  const { row, token } = await db().transaction(async (trx) => {
    const user = await findUserById(userId, trx);
    if (!user) throw new ApiError(404, 'not_found', 'That person was not found.');
    if (!user.active) throw new ApiError(409, 'deactivated', 'Reactivate this person before sending a reset link.');
    const issued = await issueToken(trx, user.id, 'reset', createdBy);
    await recordAudit(trx, {
      actorId: createdBy,
      action: 'user.reset_link_sent',
      subjectType: 'user',
      subjectId: user.id,
      details: { requestedBy: createdBy ? 'admin' : 'self' },
    });
    return { row: user, token: issued };
  });
  const mailSent = await deliver({
    to: row.email,
    ...passwordResetMail({ name: row.name, url: `${appUrl()}/reset/${token}`, minutes: TOKEN_LIFETIME_MINUTES.reset }),
  });
  return {
    person: toPerson(row),
    mailSent,
    message: mailSent ? `Reset link sent to ${row.email}.` : `The reset link for ${row.email} could not be mailed.`,
  };
}

/** An admin sends someone a reset link (or a fresh invitation link, if they never accepted one). */
export async function sendLinkAsAdmin(userId: string, actor: { id: string; name: string }): Promise<LinkSent> {
  const user = await findUserById(userId);
  if (!user) throw new ApiError(404, 'not_found', 'That person was not found.');
  if (user.password_hash === null) {
    return invitePerson({ email: user.email, name: user.name, role: user.role }, actor);
  }
  return mailResetLink(userId, actor.id);
}

/**
 * The Forgot password form. Answers the same whether or not the address has an account, so the form does
 * not tell strangers who works here.
 */
export async function requestPasswordReset(email: string): Promise<void> {
  const user = await findUserByEmail(email);
  if (!user || !user.active || user.password_hash === null) return;
  const recent = await db()('audit_events')
    .where({ subject_type: 'user', subject_id: user.id, action: 'user.reset_link_sent' })
    .andWhere('at', '>', new Date(Date.now() - 60 * 60_000))
    .first(db().raw('count(*)::int AS count'));
  if ((recent?.count ?? 0) >= SELF_SERVICE_RESETS_PER_HOUR) return;
  await mailResetLink(user.id, null);
}
