// Review transitions on the real PostgreSQL: the life of a version through lib/review/, the four-eyes
// rule in the service and in the database, frozen matrices, the approval snapshot, the review history and
// audit rows, and concurrent decisions on one version (exactly one wins; the other gets a 409 that says so).
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db';
import { addComment, reviewHistory, reviewQueue, reviewSheet, startNextDraft, transitionVersion, versionSummary, type Actor } from '@/lib/review';
import { startFakeSmtp, type FakeSmtp } from '@/lib/mail/fake-smtp';
import { runNotificationRound } from '@/lib/notifications';
import type { UserRow } from '@/lib/people';
import { makeUser, migrateTestDatabase } from './helpers';
import { makeShelf, markApproved, markInReview, SAMPLE_FIGURES } from './fixtures/shelf';

const actor = (u: UserRow): Actor => ({ id: u.id, name: u.name, role: u.role });

let engineer: UserRow;
let otherEngineer: UserRow;
let reviewer: UserRow;
let secondReviewer: UserRow;
let admin: UserRow;
let viewer: UserRow;
let smtp: FakeSmtp;

beforeAll(async () => {
  await migrateTestDatabase();
  // The mails these transitions queue are delivered after each commit, as in the server (what they say is
  // checked in review-notifications.test.ts).
  smtp = await startFakeSmtp(db(), 0);
  process.env.SMTP_PORT = String(smtp.port);
  engineer = await makeUser({ role: 'engineer', label: 'author' });
  otherEngineer = await makeUser({ role: 'engineer', label: 'colleague' });
  reviewer = await makeUser({ role: 'reviewer', label: 'reviewer' });
  secondReviewer = await makeUser({ role: 'reviewer', label: 'reviewer2' });
  // Admins are made only by people.test.ts (it counts them); an admin here is the acting role, not a stored one.
  admin = { ...(await makeUser({ role: 'reviewer', label: 'admin-actor' })), role: 'admin' };
  viewer = await makeUser({ role: 'viewer', label: 'viewer' });
});

afterAll(async () => {
  await runNotificationRound();
  await smtp?.close();
  await closeDb();
});

async function auditActions(versionId: string): Promise<string[]> {
  const rows = await db()('audit_events').where({ subject_type: 'reduced_version', subject_id: versionId }).orderBy('id');
  return rows.map((r) => r.action);
}

/** Expects a database error raised by the named constraint or trigger. */
async function expectRefusedBy(promise: Promise<unknown>, constraint: string): Promise<void> {
  await expect(promise).rejects.toMatchObject({ constraint });
}

describe('the review life through lib/review/', () => {
  it('submits, approves and retires, writing the history and an audit row for each step in its transaction', async () => {
    const { version } = await makeShelf(engineer.id);
    const submitted = await transitionVersion(version.id, 'submit', actor(engineer), '  Order 1 keeps the slow zone pole; bound 4.8e-3.  ');
    expect(submitted.version.status).toBe('in_review');
    expect(submitted.version.submittedAt).not.toBeNull();

    const approved = await transitionVersion(version.id, 'approve', actor(reviewer), 'Bode and step match within the bound.');
    expect(approved.version.status).toBe('approved');
    expect(approved.version.approval).toMatchObject({ by: { id: reviewer.id }, figures: { figures: SAMPLE_FIGURES, acceptancePassed: true, matricesSha256: version.matrices_sha256 } });

    const retired = await transitionVersion(version.id, 'retire', actor(admin), 'Superseded by the zone 2 refit.');
    expect(retired.version.status).toBe('retired');
    expect(retired.version.retirement).toMatchObject({ by: { id: admin.id }, reason: 'Superseded by the zone 2 refit.' });

    const history = await reviewHistory(version.id);
    expect(history.map((h) => [h.event, h.fromStatus, h.toStatus, h.actor.id])).toEqual([
      ['submitted', 'draft', 'in_review', engineer.id],
      ['approved', 'in_review', 'approved', reviewer.id],
      ['retired', 'approved', 'retired', admin.id],
    ]);
    expect(history[0].body).toBe('Order 1 keeps the slow zone pole; bound 4.8e-3.'); // trimmed
    expect(await auditActions(version.id)).toEqual(['reduced_version.submitted', 'reduced_version.approved', 'reduced_version.retired']);
    const approvalAudit = await db()('audit_events').where({ subject_id: version.id, action: 'reduced_version.approved' }).first();
    expect(approvalAudit).toMatchObject({ actor_id: reviewer.id, details: { from: 'in_review', to: 'approved', comment: 'Bode and step match within the bound.' } });
  });

  it('sends back for revision; the author starts the next draft version, which records its predecessor', async () => {
    const { version, reducedModel } = await makeShelf(engineer.id);
    await transitionVersion(version.id, 'submit', actor(engineer), 'First cut.');
    await transitionVersion(version.id, 'revise', actor(reviewer), 'Keep the 0.3 rad/s mode; the step error is too large.');
    await expect(transitionVersion(version.id, 'submit', actor(engineer), 'Again')).rejects.toMatchObject({ status: 409, code: 'state_conflict' });

    await expect(startNextDraft(version.id, actor(otherEngineer))).rejects.toMatchObject({ status: 403, code: 'not_author' });
    const next = await startNextDraft(version.id, actor(engineer));
    expect(next.number).toBe(2);
    const summary = await versionSummary(next.id);
    expect(summary).toMatchObject({ status: 'draft', predecessor: { id: version.id, number: 1 }, reducedModel: { id: reducedModel.id }, accuracy: { figures: SAMPLE_FIGURES } });
    await expect(startNextDraft(version.id, actor(engineer))).rejects.toMatchObject({ status: 409, code: 'next_draft_exists' });
    expect(await auditActions(next.id)).toEqual(['reduced_version.next_draft_started']);
    await transitionVersion(next.id, 'submit', actor(engineer), 'Kept the 0.3 rad/s mode as asked.');
  });

  it('refuses a draft without an accuracy report: there is nothing to review', async () => {
    const { version } = await makeShelf(engineer.id, { withReport: false });
    await expect(transitionVersion(version.id, 'submit', actor(engineer), 'Please look')).rejects.toMatchObject({ status: 409, code: 'no_accuracy_report' });
    expect((await versionSummary(version.id))!.status).toBe('draft');
  });

  it('lets only the author submit, and refuses viewers and roles the transition does not name', async () => {
    const { version } = await makeShelf(engineer.id);
    await expect(transitionVersion(version.id, 'submit', actor(otherEngineer), 'Mine now')).rejects.toMatchObject({ status: 403, code: 'not_author' });
    await expect(transitionVersion(version.id, 'submit', actor(viewer), 'x')).rejects.toMatchObject({ status: 403, code: 'forbidden' });
    await transitionVersion(version.id, 'submit', actor(engineer), 'Ready.');
    await expect(transitionVersion(version.id, 'approve', actor(viewer), 'x')).rejects.toMatchObject({ status: 403, code: 'forbidden' });
    await expect(transitionVersion(version.id, 'approve', actor(admin), 'x')).rejects.toMatchObject({ status: 403, code: 'forbidden' });
    await expect(transitionVersion(version.id, 'approve', actor(otherEngineer), 'x')).rejects.toMatchObject({ status: 403, code: 'forbidden' });
    await expect(transitionVersion(version.id, 'retire', actor(reviewer), 'x')).rejects.toMatchObject({ status: 409, code: 'state_conflict' });
    await expect(transitionVersion(version.id, 'approve', actor(reviewer), '   ')).rejects.toMatchObject({ status: 400, field: 'comment' });
    expect((await versionSummary(version.id))!.status).toBe('in_review');
    expect(await auditActions(version.id)).toEqual(['reduced_version.submitted']);
  });

  it('answers a missing version with 404', async () => {
    await expect(transitionVersion('00000000-0000-4000-8000-000000000000', 'approve', actor(reviewer), 'x')).rejects.toMatchObject({ status: 404 });
  });
});

describe('the four-eyes rule', () => {
  it('refuses a reviewer deciding on a version they authored, in the service, with a clear message', async () => {
    // An engineer promoted to reviewer still cannot approve what they authored.
    const promoted = await makeUser({ role: 'reviewer', label: 'promoted' });
    const { version } = await makeShelf(promoted.id);
    await markInReview(version.id);
    for (const action of ['approve', 'revise'] as const) {
      const refusal = transitionVersion(version.id, action, actor(promoted), 'Looks right to me');
      await expect(refusal).rejects.toMatchObject({ status: 403, code: 'four_eyes' });
      await expect(refusal).rejects.toThrow(/You authored this version.*four-eyes rule/);
    }
    expect((await versionSummary(version.id))!.status).toBe('in_review');
    const sheet = await reviewSheet(version.id, actor(promoted));
    expect(sheet!.actions).toEqual([]);
    expect(sheet!.withheld.map((w) => w.action)).toEqual(['approve', 'revise']);
  });

  it('is held by the database too: an approval by the author, or a decision row by the author, is refused', async () => {
    const { version } = await makeShelf(engineer.id);
    await markInReview(version.id);
    await expectRefusedBy(
      db()('reduced_versions').where({ id: version.id }).update({
        status: 'approved',
        approved_by: engineer.id,
        approved_at: db().raw('clock_timestamp()'),
        approved_figures: JSON.stringify({ figures: {} }),
      }),
      'reduced_versions_four_eyes_check',
    );
    await expectRefusedBy(
      db()('reviews').insert({ reduced_version_id: version.id, version_author_id: engineer.id, actor_id: engineer.id, event: 'approved', from_status: 'in_review', to_status: 'approved', body: 'self' }),
      'reviews_four_eyes_check',
    );
    // The author recorded on a review row must be the version's author (composite foreign key).
    await expect(
      db()('reviews').insert({ reduced_version_id: version.id, version_author_id: reviewer.id, actor_id: engineer.id, event: 'approved', from_status: 'in_review', to_status: 'approved', body: 'disguised' }),
    ).rejects.toMatchObject({ code: '23503' });
  });
});

describe('the database refuses impossible states', () => {
  it('refuses steps outside the life: draft → approved, revise → in_review, retired → approved', async () => {
    const a = await makeShelf(engineer.id);
    await expectRefusedBy(
      db()('reduced_versions').where({ id: a.version.id }).update({
        status: 'approved',
        submitted_at: db().raw('clock_timestamp()'),
        approved_by: reviewer.id,
        approved_at: db().raw('clock_timestamp()'),
        approved_figures: JSON.stringify({ figures: {} }),
      }),
      'reduced_versions_transition',
    );
    const b = await makeShelf(engineer.id);
    await markInReview(b.version.id);
    await db()('reduced_versions').where({ id: b.version.id }).update({ status: 'revise' });
    await expectRefusedBy(db()('reduced_versions').where({ id: b.version.id }).update({ status: 'in_review' }), 'reduced_versions_transition');
    const c = await makeShelf(engineer.id);
    await markApproved(c.version.id, reviewer.id);
    await db()('reduced_versions').where({ id: c.version.id }).update({ status: 'retired', retired_by: admin.id, retired_at: db().raw('clock_timestamp()'), retired_reason: 'old' });
    await expectRefusedBy(db()('reduced_versions').where({ id: c.version.id }).update({ status: 'approved' }), 'reduced_versions_transition');
  });

  it('refuses an approval without approver, time or snapshot, and a retirement without a reason', async () => {
    const { version } = await makeShelf(engineer.id);
    await markInReview(version.id);
    await expectRefusedBy(db()('reduced_versions').where({ id: version.id }).update({ status: 'approved' }), 'reduced_versions_approval_check');
    await expectRefusedBy(
      db()('reduced_versions').where({ id: version.id }).update({ status: 'approved', approved_by: reviewer.id, approved_at: db().raw('clock_timestamp()') }),
      'reduced_versions_approval_check',
    );
    await markApproved(version.id, reviewer.id);
    await expectRefusedBy(
      db()('reduced_versions').where({ id: version.id }).update({ status: 'retired', retired_by: admin.id, retired_at: db().raw('clock_timestamp()'), retired_reason: '  ' }),
      'reduced_versions_retirement_check',
    );
    await expectRefusedBy(db()('reduced_versions').where({ id: version.id }).update({ retired_reason: 'sneaked in' }), 'reduced_versions_retirement_check');
  });

  it('keeps the review history append-only', async () => {
    const { version } = await makeShelf(engineer.id);
    await addComment(version.id, actor(reviewer), 'Which frequency band does the controller need?');
    await expect(db()('reviews').where({ reduced_version_id: version.id }).update({ body: 'rewritten' })).rejects.toThrow(/append-only/);
    await expect(db()('reviews').where({ reduced_version_id: version.id }).delete()).rejects.toThrow(/append-only/);
  });
});

describe('frozen matrices', () => {
  const other = { A: [[-2]], B: [[1]], C: [[2]], D: [[0]] };

  it('lets a draft change, and refuses any change to matrices, digest or lineage once submitted', async () => {
    const { version, sourceVersion } = await makeShelf(engineer.id);
    await db()('reduced_versions').where({ id: version.id }).update({ matrices: JSON.stringify(other) });
    await db()('reduced_versions').where({ id: version.id }).update({ matrices: JSON.stringify({ A: [[-1]], B: [[1]], C: [[1]], D: [[0]] }) });
    await transitionVersion(version.id, 'submit', actor(engineer), 'Ready.');
    await expectRefusedBy(db()('reduced_versions').where({ id: version.id }).update({ matrices: JSON.stringify(other) }), 'reduced_versions_frozen');
    await expectRefusedBy(db()('reduced_versions').where({ id: version.id }).update({ matrices_sha256: 'f'.repeat(64) }), 'reduced_versions_frozen');
    await expectRefusedBy(db()('reduced_versions').where({ id: version.id }).update({ order: 2 }), 'reduced_versions_frozen');
    await expectRefusedBy(db()('reduced_versions').where({ id: version.id }).update({ author_id: reviewer.id }), 'reduced_versions_frozen');
    await expectRefusedBy(db()('reduced_versions').where({ id: version.id }).delete(), 'reduced_versions_frozen');
    const row = await db()('reduced_versions').where({ id: version.id }).first('matrices', 'matrices_sha256', 'source_version_id');
    expect(row).toEqual({ matrices: { A: [[-1]], B: [[1]], C: [[1]], D: [[0]] }, matrices_sha256: version.matrices_sha256, source_version_id: sourceVersion.id });
  });

  it('stays frozen after approval and retirement', async () => {
    const { version } = await makeShelf(engineer.id);
    await markApproved(version.id, reviewer.id);
    await expectRefusedBy(db()('reduced_versions').where({ id: version.id }).update({ matrices: JSON.stringify(other) }), 'reduced_versions_frozen');
    await transitionVersion(version.id, 'retire', actor(reviewer), 'Replaced.');
    await expectRefusedBy(db()('reduced_versions').where({ id: version.id }).update({ matrices: JSON.stringify(other) }), 'reduced_versions_frozen');
  });
});

describe('the approval snapshot', () => {
  it('keeps the figures the approver saw when the accuracy report is edited later, and cannot itself be edited', async () => {
    const { version } = await makeShelf(engineer.id);
    await transitionVersion(version.id, 'submit', actor(engineer), 'Ready.');
    await transitionVersion(version.id, 'approve', actor(reviewer), 'Approved at an H∞ error of 1.2e-3.');
    await db()('accuracy_reports').where({ reduced_version_id: version.id }).update({ figures: JSON.stringify({ ...SAMPLE_FIGURES, hInfinityErrorRelative: 0.5 }), acceptance_passed: false });

    const summary = (await versionSummary(version.id))!;
    expect(summary.accuracy).toMatchObject({ figures: { hInfinityErrorRelative: 0.5 }, acceptancePassed: false });
    expect(summary.approval!.figures).toMatchObject({ figures: { hInfinityErrorRelative: 1.2e-3 }, acceptancePassed: true });
    await expectRefusedBy(
      db()('reduced_versions').where({ id: version.id }).update({ approved_figures: JSON.stringify({ figures: { hInfinityErrorRelative: 0.5 } }) }),
      'reduced_versions_frozen',
    );
    await expectRefusedBy(db()('reduced_versions').where({ id: version.id }).update({ approved_by: secondReviewer.id }), 'reduced_versions_frozen');
  });
});

describe('concurrent decisions on one version', () => {
  /**
   * Holds the version's row lock in a separate transaction while `race` starts, so every contender is
   * waiting on the lock at once; then releases it and lets them run.
   */
  async function contend<T>(versionId: string, race: () => Promise<T>[]): Promise<PromiseSettledResult<T>[]> {
    const blocker = await db().transaction();
    await blocker('reduced_versions').where({ id: versionId }).forUpdate().first('id');
    const contenders = race();
    // Give each contender time to reach the lock (it waits on SELECT … FOR UPDATE).
    await new Promise((r) => setTimeout(r, 300));
    const waiting = await db().raw(`SELECT count(*)::int AS n FROM pg_stat_activity WHERE wait_event_type = 'Lock' AND query ILIKE '%reduced_versions%for update%'`);
    await blocker.commit();
    const results = await Promise.allSettled(contenders);
    expect(waiting.rows[0].n).toBeGreaterThanOrEqual(contenders.length);
    return results;
  }

  function outcome(results: PromiseSettledResult<unknown>[]) {
    const won = results.filter((r) => r.status === 'fulfilled').length;
    const lost = results.filter((r): r is PromiseRejectedResult => r.status === 'rejected').map((r) => r.reason);
    return { won, lost };
  }

  it('two reviewers approving at once: exactly one approval, the other told someone has just done it', async () => {
    const { version } = await makeShelf(engineer.id);
    await markInReview(version.id);
    const results = await contend(version.id, () => [
      transitionVersion(version.id, 'approve', actor(reviewer), 'Approve from one.'),
      transitionVersion(version.id, 'approve', actor(secondReviewer), 'Approve from two.'),
    ]);
    const { won, lost } = outcome(results);
    expect(won).toBe(1);
    expect(lost).toHaveLength(1);
    expect(lost[0]).toMatchObject({ status: 409, code: 'state_conflict' });
    expect(lost[0].message).toMatch(/is approved, not in review.*someone has just done it/);
    expect((await reviewHistory(version.id)).filter((h) => h.event === 'approved')).toHaveLength(1);
    expect((await auditActions(version.id)).filter((a) => a === 'reduced_version.approved')).toHaveLength(1);
  });

  it('approve against revise at once: exactly one decision stands', async () => {
    const { version } = await makeShelf(engineer.id);
    await markInReview(version.id);
    const results = await contend(version.id, () => [
      transitionVersion(version.id, 'approve', actor(reviewer), 'Fine.'),
      transitionVersion(version.id, 'revise', actor(secondReviewer), 'Not fine.'),
    ]);
    const { won, lost } = outcome(results);
    expect(won).toBe(1);
    expect(lost[0]).toMatchObject({ status: 409, code: 'state_conflict' });
    const history = await reviewHistory(version.id);
    expect(history.filter((h) => h.event === 'approved' || h.event === 'revise')).toHaveLength(1);
    const status = (await versionSummary(version.id))!.status;
    expect(history.at(-1)!.toStatus).toBe(status);
  });

  it('a reviewer and an admin retiring at once: one retirement, with one reason', async () => {
    const { version } = await makeShelf(engineer.id);
    await markApproved(version.id, reviewer.id);
    const results = await contend(version.id, () => [
      transitionVersion(version.id, 'retire', actor(secondReviewer), 'Reason one.'),
      transitionVersion(version.id, 'retire', actor(admin), 'Reason two.'),
    ]);
    const { won, lost } = outcome(results);
    expect(won).toBe(1);
    expect(lost[0]).toMatchObject({ status: 409, code: 'state_conflict' });
    const summary = (await versionSummary(version.id))!;
    const winner = results.findIndex((r) => r.status === 'fulfilled');
    expect(summary.retirement!.reason).toBe(winner === 0 ? 'Reason one.' : 'Reason two.');
  });
});

describe('comments and the queue', () => {
  it('threads comments from engineers, reviewers and admins in order, and refuses viewers', async () => {
    const { version } = await makeShelf(engineer.id);
    await addComment(version.id, actor(reviewer), 'Is the DC gain kept?');
    await addComment(version.id, actor(engineer), 'Yes: residualization keeps it exactly.');
    await expect(addComment(version.id, actor(viewer), 'me too')).rejects.toMatchObject({ status: 403, code: 'forbidden' });
    const history = await reviewHistory(version.id);
    expect(history.map((h) => [h.event, h.body])).toEqual([
      ['comment', 'Is the DC gain kept?'],
      ['comment', 'Yes: residualization keeps it exactly.'],
    ]);
    expect(await auditActions(version.id)).toEqual(['reduced_version.commented', 'reduced_version.commented']);
  });

  it('lists versions in review with their note, marking which are yours to decide', async () => {
    const { version } = await makeShelf(engineer.id);
    await transitionVersion(version.id, 'submit', actor(engineer), 'Please check the band 1 to 100 rad/s.');
    const forReviewer = (await reviewQueue(actor(reviewer))).find((q) => q.versionId === version.id);
    expect(forReviewer).toMatchObject({ number: 1, note: 'Please check the band 1 to 100 rad/s.', yoursToDecide: true, hInfinityErrorRelative: 1.2e-3, fullOrder: 40 });
    const forAuthor = (await reviewQueue(actor(engineer))).find((q) => q.versionId === version.id);
    expect(forAuthor!.yoursToDecide).toBe(false);
  });
});
