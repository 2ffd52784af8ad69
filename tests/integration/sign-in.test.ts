// Sign-in checks and rate limiting against the real sign_in_attempts table. The limits (5 failures per
// account, 20 per address, 15-minute window) are our own choice, common practice; see lib/auth/sign-in.ts.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db';
import { checkSignIn, SIGN_IN_LIMITS } from '@/lib/auth/sign-in';
import { makeUser, migrateTestDatabase, uniqueAddress, uniqueEmail } from './helpers';

beforeAll(migrateTestDatabase);
afterAll(closeDb);

const PASSWORD = 'correct horse battery';
const minutesLater = (base: Date, m: number) => new Date(base.getTime() + m * 60_000);

describe('checkSignIn', () => {
  it('accepts the right password and reports the role', async () => {
    const user = await makeUser({ role: 'reviewer' });
    const result = await checkSignIn({ email: user.email.toUpperCase(), password: PASSWORD, address: uniqueAddress() });
    expect(result).toMatchObject({ ok: true, user: { id: user.id, role: 'reviewer' } });
    const row = await db()('users').where({ id: user.id }).first();
    expect(row.last_signed_in_at).not.toBeNull();
  });

  it('answers a wrong password and an unknown address with the same words', async () => {
    const user = await makeUser({});
    const wrong = await checkSignIn({ email: user.email, password: 'not the password', address: uniqueAddress() });
    const unknown = await checkSignIn({ email: uniqueEmail('nobody'), password: PASSWORD, address: uniqueAddress() });
    expect(wrong).toEqual({ ok: false, reason: 'invalid_credentials', message: 'Wrong e-mail or password.' });
    expect(unknown).toEqual(wrong);
  });

  it('refuses an invited person who has not chosen a password yet', async () => {
    const user = await makeUser({ password: null });
    const result = await checkSignIn({ email: user.email, password: '', address: uniqueAddress() });
    expect(result).toMatchObject({ ok: false, reason: 'invalid_credentials' });
  });

  it('tells a deactivated person, with the right password, that the account is deactivated', async () => {
    const user = await makeUser({ active: false });
    const result = await checkSignIn({ email: user.email, password: PASSWORD, address: uniqueAddress() });
    expect(result).toMatchObject({ ok: false, reason: 'deactivated' });
    if (!result.ok) expect(result.message).toMatch(/deactivated/);
  });

  it('stops an account after 5 failures in 15 minutes, even with the right password, and says for how long', async () => {
    const user = await makeUser({});
    const start = new Date();
    for (let i = 0; i < SIGN_IN_LIMITS.failuresPerAccount; i++) {
      const r = await checkSignIn({ email: user.email, password: `guess ${i}xxxxxx`, address: uniqueAddress(), now: start });
      expect(r).toMatchObject({ ok: false, reason: 'invalid_credentials' });
    }
    const blocked = await checkSignIn({ email: user.email, password: PASSWORD, address: uniqueAddress(), now: minutesLater(start, 1) });
    expect(blocked).toMatchObject({ ok: false, reason: 'rate_limited_account' });
    if (!blocked.ok) expect(blocked.message).toMatch(/Too many failed sign-ins for this account\. Try again in 14 minutes/);

    // Scoped to the account: another account, from the same address, is not affected.
    const other = await makeUser({});
    const otherResult = await checkSignIn({ email: other.email, password: PASSWORD, address: uniqueAddress(), now: minutesLater(start, 1) });
    expect(otherResult.ok).toBe(true);

    // Once the failures leave the window, the right password works again.
    const later = await checkSignIn({ email: user.email, password: PASSWORD, address: uniqueAddress(), now: minutesLater(start, 16) });
    expect(later.ok).toBe(true);
  });

  it('does not count failures from before a successful sign-in', async () => {
    const user = await makeUser({});
    const start = new Date();
    for (let i = 0; i < SIGN_IN_LIMITS.failuresPerAccount - 1; i++) {
      await checkSignIn({ email: user.email, password: 'wrong wrong wrong', address: uniqueAddress(), now: start });
    }
    expect((await checkSignIn({ email: user.email, password: PASSWORD, address: uniqueAddress(), now: minutesLater(start, 1) })).ok).toBe(true);
    await checkSignIn({ email: user.email, password: 'wrong wrong wrong', address: uniqueAddress(), now: minutesLater(start, 2) });
    expect((await checkSignIn({ email: user.email, password: PASSWORD, address: uniqueAddress(), now: minutesLater(start, 3) })).ok).toBe(true);
  });

  it('stops one address after 20 failures across accounts, and only that address', async () => {
    const address = uniqueAddress();
    const start = new Date();
    for (let i = 0; i < SIGN_IN_LIMITS.failuresPerAddress; i++) {
      await checkSignIn({ email: uniqueEmail('spray'), password: 'wrong wrong wrong', address, now: start });
    }
    const victim = await makeUser({});
    const fromThatAddress = await checkSignIn({ email: victim.email, password: PASSWORD, address, now: minutesLater(start, 1) });
    expect(fromThatAddress).toMatchObject({ ok: false, reason: 'rate_limited_address' });
    if (!fromThatAddress.ok) expect(fromThatAddress.message).toMatch(/network address\. Try again in 14 minutes/);
    const elsewhere = await checkSignIn({ email: victim.email, password: PASSWORD, address: uniqueAddress(), now: minutesLater(start, 1) });
    expect(elsewhere.ok).toBe(true);
  });

  it('does not record refused tries, so waiting out the window always works', async () => {
    const user = await makeUser({});
    const start = new Date();
    for (let i = 0; i < SIGN_IN_LIMITS.failuresPerAccount; i++) {
      await checkSignIn({ email: user.email, password: 'wrong wrong wrong', address: uniqueAddress(), now: start });
    }
    for (let m = 1; m <= 10; m += 3) {
      await checkSignIn({ email: user.email, password: 'wrong wrong wrong', address: uniqueAddress(), now: minutesLater(start, m) });
    }
    const attempts = await db()('sign_in_attempts').where({ email: user.email }).count<{ count: string }[]>('* as count');
    expect(Number(attempts[0].count)).toBe(SIGN_IN_LIMITS.failuresPerAccount);
    expect((await checkSignIn({ email: user.email, password: PASSWORD, address: uniqueAddress(), now: minutesLater(start, 16) })).ok).toBe(true);
  });
});
