// Invitations and password resets end to end below the web layer: the real database, nodemailer over SMTP
// to our fake server on a free loopback port, the outbox row it files, and redeeming the mailed link.
import { createHash } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ZodError } from 'zod';
import { closeDb, db } from '@/lib/db';
import { startFakeSmtp, type FakeSmtp } from '@/lib/mail/fake-smtp';
import { sendMail } from '@/lib/mail/transport';
import { invitePerson, requestPasswordReset, sendLinkAsAdmin, SELF_SERVICE_RESETS_PER_HOUR } from '@/lib/account-links';
import { inspectToken, redeemToken, TOKEN_LIFETIME_MINUTES } from '@/lib/auth/tokens';
import { checkSignIn } from '@/lib/auth/sign-in';
import { updatePerson } from '@/lib/people';
import { makeUser, migrateTestDatabase, uniqueAddress, uniqueEmail } from './helpers';

let smtp: FakeSmtp;

beforeAll(async () => {
  await migrateTestDatabase();
  smtp = await startFakeSmtp(db(), 0); // port 0: the system picks a free one
  process.env.SMTP_PORT = String(smtp.port); // read when the first mail is sent
  process.env.APP_URL = 'http://modeshelf.test';
});

afterAll(async () => {
  await smtp?.close();
  await closeDb();
});

async function latestMailTo(email: string) {
  return db()('outbox').whereRaw('? = ANY(envelope_to)', [email]).orderBy('id', 'desc').first();
}

function linkIn(text: string, path: 'invite' | 'reset'): string {
  const match = new RegExp(`http://modeshelf\\.test/${path}/([A-Za-z0-9_-]{43})`).exec(text);
  if (!match) throw new Error(`no ${path} link in mail:\n${text}`);
  return match[1];
}

describe('the fake SMTP server', () => {
  it('files what nodemailer sends into the outbox, subject and bodies decoded', async () => {
    const to = uniqueEmail('mail');
    await sendMail({ to, subject: 'Prüfstand Ofen 3 — Übergabe', text: 'Grüße aus der Halle\n', html: '<p>Grüße</p>' });
    const row = await latestMailTo(to);
    expect(row.subject).toBe('Prüfstand Ofen 3 — Übergabe');
    expect(row.text_body).toBe('Grüße aus der Halle\n');
    expect(row.html_body).toBe('<p>Grüße</p>');
    expect(row.envelope_to).toEqual([to]);
    expect(row.raw).toContain('Subject:');
  });
});

describe('invitations', () => {
  it('mail a single-use link whose token is stored only as its SHA-256', async () => {
    const admin = await makeUser({ role: 'engineer', label: 'inviter' });
    const email = uniqueEmail('invitee');
    const sent = await invitePerson({ email, name: 'Ola Invitee', role: 'engineer' }, { id: admin.id, name: admin.name });
    expect(sent).toMatchObject({ mailSent: true, person: { email, role: 'engineer', hasPassword: false } });

    const mail = await latestMailTo(email);
    expect(mail.subject).toBe('You are invited to Modeshelf');
    const token = linkIn(mail.text_body, 'invite');

    const stored = await db()('auth_tokens').where({ user_id: sent.person.id, purpose: 'invite' });
    expect(stored).toHaveLength(1);
    expect(stored[0].token_hash).toBe(createHash('sha256').update(token).digest('hex'));
    expect(JSON.stringify(stored)).not.toContain(token);

    const state = await inspectToken(token);
    expect(state).toMatchObject({ valid: true, info: { purpose: 'invite', email, name: 'Ola Invitee' } });

    await redeemToken(token, 'kiln firing curve 7');
    const signIn = await checkSignIn({ email, password: 'kiln firing curve 7', address: uniqueAddress() });
    expect(signIn).toMatchObject({ ok: true, user: { role: 'engineer' } });

    await expect(redeemToken(token, 'another password 8')).rejects.toMatchObject({ status: 410, code: 'token_used' });
    const again = await checkSignIn({ email, password: 'another password 8', address: uniqueAddress() });
    expect(again.ok).toBe(false);
  });

  it('expire after a week', async () => {
    const admin = await makeUser({ role: 'engineer', label: 'inviter' });
    const email = uniqueEmail('late');
    await invitePerson({ email, name: 'Late Invitee', role: 'viewer' }, { id: admin.id, name: admin.name });
    const token = linkIn((await latestMailTo(email)).text_body, 'invite');
    const afterExpiry = new Date(Date.now() + (TOKEN_LIFETIME_MINUTES.invite + 1) * 60_000);
    expect(await inspectToken(token, afterExpiry)).toMatchObject({ valid: false, code: 'expired' });
    await expect(redeemToken(token, 'kiln firing curve 7', afterExpiry)).rejects.toMatchObject({ code: 'token_expired' });
  });

  it('refuse a password shorter than 10 characters and leave the link usable', async () => {
    const admin = await makeUser({ role: 'engineer', label: 'inviter' });
    const email = uniqueEmail('short');
    await invitePerson({ email, name: 'Short Password', role: 'viewer' }, { id: admin.id, name: admin.name });
    const token = linkIn((await latestMailTo(email)).text_body, 'invite');
    await expect(redeemToken(token, '123456789')).rejects.toBeInstanceOf(ZodError);
    expect((await inspectToken(token)).valid).toBe(true);
  });

  it('sent again void the earlier link', async () => {
    const admin = await makeUser({ role: 'engineer', label: 'inviter' });
    const email = uniqueEmail('twice');
    const first = await invitePerson({ email, name: 'Twice Invited', role: 'viewer' }, { id: admin.id, name: admin.name });
    const firstToken = linkIn((await latestMailTo(email)).text_body, 'invite');
    await sendLinkAsAdmin(first.person.id, { id: admin.id, name: admin.name });
    const secondToken = linkIn((await latestMailTo(email)).text_body, 'invite');
    expect(secondToken).not.toBe(firstToken);
    expect(await inspectToken(firstToken)).toMatchObject({ valid: false, code: 'unknown' });
    expect((await inspectToken(secondToken)).valid).toBe(true);
  });

  it('refuse an address that already has an account', async () => {
    const admin = await makeUser({ role: 'engineer', label: 'inviter' });
    const existing = await makeUser({ role: 'viewer' });
    await expect(
      invitePerson({ email: existing.email, name: 'Again', role: 'viewer' }, { id: admin.id, name: admin.name }),
    ).rejects.toMatchObject({ status: 409, code: 'already_registered', field: 'email' });
  });
});

describe('password resets', () => {
  it('mail an hour-long single-use link that replaces the password', async () => {
    const person = await makeUser({ role: 'viewer' });
    await requestPasswordReset(person.email.toUpperCase());
    const mail = await latestMailTo(person.email);
    expect(mail.subject).toBe('Reset your Modeshelf password');
    const token = linkIn(mail.text_body, 'reset');
    const afterAnHour = new Date(Date.now() + (TOKEN_LIFETIME_MINUTES.reset + 1) * 60_000);
    expect(await inspectToken(token, afterAnHour)).toMatchObject({ valid: false, code: 'expired' });

    await redeemToken(token, 'new kiln password');
    expect((await checkSignIn({ email: person.email, password: 'correct horse battery', address: uniqueAddress() })).ok).toBe(false);
    expect((await checkSignIn({ email: person.email, password: 'new kiln password', address: uniqueAddress() })).ok).toBe(true);
  });

  it('send nothing for an address without an account', async () => {
    const nobody = uniqueEmail('nobody');
    await requestPasswordReset(nobody);
    expect(await latestMailTo(nobody)).toBeUndefined();
  });

  it(`send at most ${SELF_SERVICE_RESETS_PER_HOUR} self-service links an hour`, async () => {
    const person = await makeUser({ role: 'viewer' });
    for (let i = 0; i < SELF_SERVICE_RESETS_PER_HOUR + 2; i++) await requestPasswordReset(person.email);
    const count = await db()('outbox').whereRaw('? = ANY(envelope_to)', [person.email]).count<{ count: string }[]>('* as count');
    expect(Number(count[0].count)).toBe(SELF_SERVICE_RESETS_PER_HOUR);
  });

  it('stop working when the account is deactivated', async () => {
    const admin = await makeUser({ role: 'engineer', label: 'actor' });
    const person = await makeUser({ role: 'viewer' });
    await requestPasswordReset(person.email);
    const token = linkIn((await latestMailTo(person.email)).text_body, 'reset');
    await updatePerson(person.id, { active: false }, admin.id);
    await expect(redeemToken(token, 'new kiln password')).rejects.toMatchObject({ code: 'token_deactivated' });
  });
});
