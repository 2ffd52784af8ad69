// Review mail on the real PostgreSQL and over real SMTP to the fake server: who is told what when a version
// is submitted or decided, each person's preferences, delivery after commit, and failed sends that are
// retried without touching the review.
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db';
import { startFakeSmtp, type FakeSmtp } from '@/lib/mail/fake-smtp';
import { transitionVersion, type Actor } from '@/lib/review';
import {
  deliverDueMail,
  getPreferences,
  MAX_ATTEMPTS,
  queueMail,
  preferencesUpdateSchema,
  retryDelaySeconds,
  runNotificationRound,
  setAfterCommitDelivery,
  updatePreferences,
} from '@/lib/notifications';
import type { UserRow } from '@/lib/people';
import { makeUser, migrateTestDatabase } from './helpers';
import { makeShelf } from './fixtures/shelf';

const actor = (u: UserRow): Actor => ({ id: u.id, name: u.name, role: u.role });
let smtp: FakeSmtp;

beforeAll(async () => {
  await migrateTestDatabase();
  smtp = await startFakeSmtp(db(), 0);
  process.env.SMTP_PORT = String(smtp.port);
  process.env.APP_URL = 'http://modeshelf.test';
  setAfterCommitDelivery(false); // each test sends its own mail explicitly, except the one that tests the kick
});

// Each submission mails every reviewer in the (shared) test database; send it all before the next test so
// the queue holds only what that test queues.
afterEach(async () => {
  await runNotificationRound();
});

afterAll(async () => {
  await smtp?.close();
  await closeDb();
});

async function queuedFor(userId: string, versionUrlPart?: string) {
  const rows = await db()('mail_queue').where({ recipient_id: userId }).orderBy('id');
  return versionUrlPart ? rows.filter((r) => r.text_body.includes(versionUrlPart)) : rows;
}

async function outboxTo(email: string) {
  return db()('outbox').whereRaw('? = ANY(envelope_to)', [email]).orderBy('id');
}

describe('who is told', () => {
  it('tells every reviewer who wants it when a version is submitted, never its author, nor the opted-out or inactive', async () => {
    const author = await makeUser({ role: 'engineer', label: 'author' });
    const keen = await makeUser({ role: 'reviewer', label: 'keen' });
    const quiet = await makeUser({ role: 'reviewer', label: 'quiet' });
    const gone = await makeUser({ role: 'reviewer', label: 'gone', active: false });
    const invited = await makeUser({ role: 'reviewer', label: 'invited', password: null });
    const authorReviewer = await makeUser({ role: 'reviewer', label: 'self' });
    await updatePreferences(quiet.id, { reviewRequested: false });

    const { version } = await makeShelf(author.id);
    const result = await transitionVersion(version.id, 'submit', actor(author), 'Zone 3, order 1: please check the slow pole.');
    expect(result.mailsQueued).toBeGreaterThanOrEqual(1);
    const url = `/reviews/${version.id}`;
    const [mail] = await queuedFor(keen.id, url);
    expect(mail).toMatchObject({ kind: 'review_requested', to_address: keen.email });
    expect(mail.subject).toBe(`Review requested: ${result.version.reducedModel.name} v1`);
    expect(mail.text_body).toContain('> Zone 3, order 1: please check the slow pole.');
    expect(mail.text_body).toContain(`http://modeshelf.test${url}`);
    for (const u of [quiet, gone, invited, author]) expect(await queuedFor(u.id, url)).toHaveLength(0);

    // A reviewer's own submission (they authored it before a role change) does not mail them.
    const own = await makeShelf(authorReviewer.id);
    await db()('users').where({ id: authorReviewer.id }).update({ role: 'engineer' });
    await transitionVersion(own.version.id, 'submit', { ...actor(authorReviewer), role: 'engineer' }, 'Mine.');
    await db()('users').where({ id: authorReviewer.id }).update({ role: 'reviewer' });
    expect(await queuedFor(authorReviewer.id, `/reviews/${own.version.id}`)).toHaveLength(0);
  });

  it('tells the author of an approval and of a revise decision, with the comment; unless they opted out', async () => {
    const author = await makeUser({ role: 'engineer', label: 'author' });
    const reviewer = await makeUser({ role: 'reviewer', label: 'decider' });
    const a = await makeShelf(author.id);
    await transitionVersion(a.version.id, 'submit', actor(author), 'v1');
    await transitionVersion(a.version.id, 'approve', actor(reviewer), 'Within the bound over 0.1 to 100 rad/s.');
    const [approved] = await queuedFor(author.id, `/reviews/${a.version.id}`);
    expect(approved).toMatchObject({ kind: 'review_decided', subject: `Approved: ${a.reducedModel.name} v1` });
    expect(approved.text_body).toContain('> Within the bound over 0.1 to 100 rad/s.');

    const b = await makeShelf(author.id);
    await transitionVersion(b.version.id, 'submit', actor(author), 'v1');
    await transitionVersion(b.version.id, 'revise', actor(reviewer), 'Step error 4 % is too large.');
    const [sentBack] = await queuedFor(author.id, `/reviews/${b.version.id}`);
    expect(sentBack.subject).toBe(`Sent back for revision: ${b.reducedModel.name} v1`);

    await updatePreferences(author.id, { reviewDecided: false });
    const c = await makeShelf(author.id);
    await transitionVersion(c.version.id, 'submit', actor(author), 'v1');
    const decided = await transitionVersion(c.version.id, 'approve', actor(reviewer), 'ok');
    expect(decided.mailsQueued).toBe(0);
    expect(await queuedFor(author.id, `/reviews/${c.version.id}`)).toHaveLength(0);
  });
});

describe('delivery', () => {
  it('sends queued mail over SMTP after the commit, into the outbox the Mail page reads', async () => {
    const author = await makeUser({ role: 'engineer', label: 'author' });
    const reviewer = await makeUser({ role: 'reviewer', label: 'reader' });
    const { version } = await makeShelf(author.id);
    await transitionVersion(version.id, 'submit', actor(author), 'Please review.');
    const [queued] = await queuedFor(reviewer.id, `/reviews/${version.id}`);
    // Another test file's round may send it first; either way it goes out exactly once.
    await deliverDueMail({ onlyIds: [queued.id] });
    const captured = await outboxTo(reviewer.email);
    expect(captured).toHaveLength(1);
    expect(captured[0].subject).toBe(queued.subject);
    expect(captured[0].text_body).toContain(`http://modeshelf.test/reviews/${version.id}`);
    const after = await db()('mail_queue').where({ id: queued.id }).first();
    expect(after).toMatchObject({ status: 'sent', attempts: 1, last_error: null });
    expect(after.sent_at).not.toBeNull();
    // Sent mail is not sent again.
    expect(await deliverDueMail({ onlyIds: [queued.id] })).toEqual({ sent: 0, retrying: 0, gaveUp: 0 });
  });

  // Other test files run notification rounds at the same time on the same database. So that only these
  // tests' explicit calls touch their mail, it is queued dated a day ahead and delivered with `now` moved
  // there: no other sender finds it due.
  const DAY_AHEAD = () => new Date(Date.now() + 24 * 3600 * 1000);
  const later = (t: Date, seconds: number) => new Date(t.getTime() + seconds * 1000);

  async function queueAhead(recipient: UserRow, at: Date, subject: string): Promise<string> {
    return db().transaction(async (trx) => {
      await queueMail(trx, {
        kind: 'review_decided',
        recipient: { id: recipient.id, email: recipient.email, name: recipient.name },
        content: { subject, text: `${subject}\n`, html: `<p>${subject}</p>` },
      });
      const row = await trx('mail_queue').where({ recipient_id: recipient.id, subject }).first('id');
      await trx('mail_queue').where({ id: row.id }).update({ next_attempt_at: at });
      return String(row.id);
    });
  }

  it('keeps the decision when the send fails, and retries with back-off until it goes through', async () => {
    const author = await makeUser({ role: 'engineer', label: 'author' });
    const reviewer = await makeUser({ role: 'reviewer', label: 'approver' });
    const { version } = await makeShelf(author.id);
    await transitionVersion(version.id, 'submit', actor(author), 'v1');
    await transitionVersion(version.id, 'approve', actor(reviewer), 'Approved.');
    const t0 = DAY_AHEAD();
    const id = await queueAhead(author, t0, 'Approved: retry test');

    const refused = async () => {
      throw new Error('connect ECONNREFUSED 127.0.0.1:2525');
    };
    expect(await deliverDueMail({ onlyIds: [id], send: refused, now: t0 })).toEqual({ sent: 0, retrying: 1, gaveUp: 0 });
    const failed = await db()('mail_queue').where({ id }).first();
    expect(failed).toMatchObject({ status: 'pending', attempts: 1, last_error: 'connect ECONNREFUSED 127.0.0.1:2525' });
    expect((failed.next_attempt_at.getTime() - t0.getTime()) / 1000).toBe(retryDelaySeconds(1));
    expect((await db()('reduced_versions').where({ id: version.id }).first('status')).status).toBe('approved');

    // Not due yet: nothing happens; once due, it goes.
    expect(await deliverDueMail({ onlyIds: [id], now: later(t0, retryDelaySeconds(1) - 1) })).toEqual({ sent: 0, retrying: 0, gaveUp: 0 });
    expect(await deliverDueMail({ onlyIds: [id], now: later(t0, retryDelaySeconds(1)) })).toEqual({ sent: 1, retrying: 0, gaveUp: 0 });
    expect((await outboxTo(author.email)).map((m) => m.subject)).toContain('Approved: retry test');
    expect(await db()('mail_queue').where({ id }).first()).toMatchObject({ status: 'sent', attempts: 2, last_error: null });
  });

  it(`gives up after ${MAX_ATTEMPTS} failed attempts, waiting longer each time, and marks the mail failed`, async () => {
    const author = await makeUser({ role: 'engineer', label: 'author' });
    let t = DAY_AHEAD();
    const id = await queueAhead(author, t, 'Sent back: give-up test');
    const refused = async () => {
      throw new Error('452 mailbox full');
    };
    const outcomes = [];
    const waits = [];
    for (let i = 0; i < MAX_ATTEMPTS; i++) {
      outcomes.push(await deliverDueMail({ onlyIds: [id], send: refused, now: t }));
      const row = await db()('mail_queue').where({ id }).first('next_attempt_at');
      waits.push((row.next_attempt_at.getTime() - t.getTime()) / 1000);
      t = row.next_attempt_at;
    }
    expect(outcomes.slice(0, -1).every((o) => o.retrying === 1)).toBe(true);
    expect(outcomes.at(-1)).toEqual({ sent: 0, retrying: 0, gaveUp: 1 });
    expect(waits.slice(0, -1)).toEqual([30, 60, 120, 240, 480]);
    expect(await db()('mail_queue').where({ id }).first()).toMatchObject({ status: 'failed', attempts: MAX_ATTEMPTS, last_error: '452 mailbox full' });
    expect(await deliverDueMail({ onlyIds: [id], now: later(t, 86_400) })).toEqual({ sent: 0, retrying: 0, gaveUp: 0 });
  });

  it('takes over a mail whose sender died mid-send once its claim expires', async () => {
    const author = await makeUser({ role: 'engineer', label: 'author' });
    const t0 = DAY_AHEAD();
    const id = await queueAhead(author, t0, 'Approved: takeover test');
    await db()('mail_queue').where({ id }).update({ status: 'sending', attempts: 1, claimed_until: later(t0, 60) });
    expect(await deliverDueMail({ onlyIds: [id], now: later(t0, 59) })).toEqual({ sent: 0, retrying: 0, gaveUp: 0 });
    expect(await deliverDueMail({ onlyIds: [id], now: later(t0, 61) })).toEqual({ sent: 1, retrying: 0, gaveUp: 0 });
    expect(await db()('mail_queue').where({ id }).first()).toMatchObject({ status: 'sent', attempts: 2 });
  });

  it('delivers right after the request when after-commit delivery is on (as in the server)', async () => {
    const author = await makeUser({ role: 'engineer', label: 'author' });
    const reviewer = await makeUser({ role: 'reviewer', label: 'prompt' });
    const { version } = await makeShelf(author.id);
    setAfterCommitDelivery(true);
    try {
      await transitionVersion(version.id, 'submit', actor(author), 'Prompt mail, please.');
      await expect.poll(async () => (await outboxTo(reviewer.email)).length, { timeout: 10_000, interval: 200 }).toBeGreaterThanOrEqual(1);
    } finally {
      setAfterCommitDelivery(false);
    }
  });
});

describe('preferences', () => {
  it('default to every mail, change one at a time, and record the change in audit_events', async () => {
    const person = await makeUser({ role: 'reviewer', label: 'prefs' });
    expect(await getPreferences(person.id)).toEqual({ reviewRequested: true, reviewDecided: true, upstreamChanged: true });
    expect(await updatePreferences(person.id, { upstreamChanged: false })).toEqual({ reviewRequested: true, reviewDecided: true, upstreamChanged: false });
    expect(await updatePreferences(person.id, { reviewRequested: false })).toEqual({ reviewRequested: false, reviewDecided: true, upstreamChanged: false });
    const audits = await db()('audit_events').where({ subject_type: 'user', subject_id: person.id, action: 'user.notifications_changed' });
    expect(audits).toHaveLength(2);
    expect(audits[1].details.to).toEqual({ reviewRequested: false, reviewDecided: true, upstreamChanged: false });
  });

  it('refuse unknown settings and values that are not true or false, naming the field', () => {
    const notBoolean = preferencesUpdateSchema.safeParse({ reviewDecided: 'yes' });
    expect(notBoolean.success).toBe(false);
    if (!notBoolean.success) expect(notBoolean.error.issues[0]).toMatchObject({ path: ['reviewDecided'], message: 'reviewDecided must be true or false.' });
    expect(preferencesUpdateSchema.safeParse({ digest: true }).success).toBe(false);
    expect(preferencesUpdateSchema.safeParse({}).success).toBe(false);
  });
});
