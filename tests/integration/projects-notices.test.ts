// Mail to controller project members on the real PostgreSQL and over SMTP to the fake server: a newer
// approved version that satisfies a pin, a retired resolved version, and an upstream change, each told once,
// through the review feature's mail queue and notification round (lib/notifications/sender.ts), with the
// approval and retirement made by the review service itself (lib/review/).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db';
import { startFakeSmtp, type FakeSmtp } from '@/lib/mail/fake-smtp';
import { transitionVersion, type Actor } from '@/lib/review';
import { queuePinNotices, runNotificationRound, setAfterCommitDelivery } from '@/lib/notifications';
import type { SessionUser } from '@/lib/auth';
import type { UserRow } from '@/lib/people';
import { addMember, createProject } from '@/lib/projects';
import { createPin } from '@/lib/pins';
import { makeUser, migrateTestDatabase } from './helpers';
import { addUpstreamVersion, addVersion, makeProjectShelf, stiffTestModel, uniqueSlug, type ProjectShelf } from './fixtures/projects';

const asSession = (u: UserRow): SessionUser => ({ id: u.id, email: u.email, name: u.name, role: u.role });
const actor = (u: UserRow): Actor => ({ id: u.id, name: u.name, role: u.role });
let smtp: FakeSmtp;

beforeAll(async () => {
  await migrateTestDatabase();
  smtp = await startFakeSmtp(db(), 0);
  process.env.SMTP_PORT = String(smtp.port);
  process.env.APP_URL = 'http://modeshelf.test';
  setAfterCommitDelivery(false); // the tests run the rounds themselves
});

afterAll(async () => {
  await runNotificationRound();
  await smtp?.close();
  await closeDb();
});

/**
 * The pin mail that reached the fake SMTP for `email`, once at least `atLeast` have (or after 15 s): another
 * test file's explicit round may have claimed this file's mail and be sending it through its own fake SMTP,
 * which files into the same outbox a moment later. Callers then assert the exact count.
 */
async function pinMailTo(email: string, atLeast = 1) {
  const read = () => db()('outbox').whereRaw('? = ANY(envelope_to)', [email]).andWhere('subject', 'like', 'Pins changed:%').orderBy('id');
  const until = Date.now() + 15_000;
  let rows = await read();
  while (rows.length < atLeast && Date.now() < until) {
    await new Promise((r) => setTimeout(r, 200));
    rows = await read();
  }
  return rows;
}

/** A draft taken through submit and approve by the review service, as people would. */
async function approveThroughReview(shelf: ProjectShelf, matrices = stiffTestModel(3)) {
  const draft = await addVersion(shelf, { matrices, status: 'draft' });
  await transitionVersion(draft.id, 'submit', actor(shelf.author), 'ready for review');
  await transitionVersion(draft.id, 'approve', actor(shelf.reviewer), 'matches the full model in the band');
  return draft;
}

describe('pin notices to project members', () => {
  let shelf: ProjectShelf;
  let engineer: SessionUser;
  let viewer: SessionUser;
  let newest: { slug: string };
  let exact: { slug: string };

  beforeAll(async () => {
    shelf = await makeProjectShelf('notice');
    await addVersion(shelf); // v1, approved
    engineer = asSession(await makeUser({ role: 'engineer', label: 'notice-eng' }));
    viewer = asSession(await makeUser({ role: 'viewer', label: 'notice-viewer' }));
    newest = await createProject({ name: `Newest ${uniqueSlug('n')}`, slug: uniqueSlug('newest') }, engineer);
    await addMember(newest.slug, viewer.email, engineer);
    await createPin(newest.slug, { reducedModel: shelf.reducedModel.slug, mode: 'newest_approved', maxOrder: 4 }, engineer);
    exact = await createProject({ name: `Exact ${uniqueSlug('e')}`, slug: uniqueSlug('exact') }, engineer);
    await createPin(exact.slug, { reducedModel: shelf.reducedModel.slug, mode: 'exact', version: 1 }, engineer);
  });

  it('tell nothing about the state a pin was made in', async () => {
    const { changes, queued } = await queuePinNotices({ reducedModelIds: [shelf.reducedModel.id] });
    expect(changes).toEqual([]);
    expect(queued).toBe(0);
  });

  it('mail members when a newer approved version satisfies the pin, once, and not for one outside the limits', async () => {
    await approveThroughReview(shelf, stiffTestModel(6)); // v2: order 6, outside the newest pin's maxOrder 4
    const outside = await queuePinNotices({ reducedModelIds: [shelf.reducedModel.id] });
    // Only the exact pin (which any newer approved version "satisfies") hears of v2.
    expect(outside.changes.map((c) => [c.projectSlug, c.kind, c.versionNumber])).toEqual([[exact.slug, 'newer_approved', 2]]);

    await approveThroughReview(shelf, stiffTestModel(3)); // v3: within the limits
    await runNotificationRound();
    const viewerMail = await pinMailTo(viewer.email);
    expect(viewerMail).toHaveLength(1);
    expect(viewerMail[0].subject).toMatch(/^Pins changed: Newest /);
    expect(viewerMail[0].text_body).toContain(`v3 of ${shelf.reducedModel.slug} is approved and meets the pin's limits; the pin now resolves to it (was v1).`);
    expect(viewerMail[0].text_body).toContain(`http://modeshelf.test/projects/${newest.slug}`);
    const engineerMail = await pinMailTo(engineer.email, 2); // the exact pin heard of v2, then of v3
    expect(engineerMail.map((m) => m.text_body).join('\n')).toContain(`v3 of ${shelf.reducedModel.slug} is approved; this exact pin stays at v1.`);

    const again = await queuePinNotices();
    expect(again.changes.filter((c) => c.reducedModelSlug === shelf.reducedModel.slug)).toEqual([]);
    await runNotificationRound();
    expect(await pinMailTo(viewer.email)).toHaveLength(1);
  });

  it('mail members when the version a pin resolves to is retired (through the review service)', async () => {
    const v3 = await db()('reduced_versions').where({ reduced_model_id: shelf.reducedModel.id, number: 3 }).first('id');
    await transitionVersion(v3.id, 'retire', actor(shelf.reviewer), 'replaced after a sensor change');
    await runNotificationRound();
    const viewerMail = await pinMailTo(viewer.email, 2);
    expect(viewerMail).toHaveLength(2);
    expect(viewerMail[1].text_body).toContain(`v3 of ${shelf.reducedModel.slug} has been retired; the pin now resolves to v1.`);
  });

  it('mail members when the source of the resolved version changes upstream', async () => {
    await addUpstreamVersion(shelf);
    await runNotificationRound();
    const viewerMail = await pinMailTo(viewer.email, 3);
    expect(viewerMail).toHaveLength(3);
    expect(viewerMail[2].text_body).toContain(`The source model of ${shelf.reducedModel.slug} v1 has a newer version`);
    expect(viewerMail[2].text_body).toContain('verify closed-loop behaviour against the full model and on the hardware');
    const queuedKinds = await db()('mail_queue').where({ recipient_id: viewer.id }).pluck('kind');
    expect(new Set(queuedKinds)).toEqual(new Set(['pin_changed']));
  });
});
