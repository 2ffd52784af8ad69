// Upstream changes, re-running a recipe, lineage and the Dashboard feed on the real PostgreSQL: a new
// source version marks every live reduced version derived from an older one (derived from version numbers,
// never stored), mails their authors once, and a re-run queues a reduction job with the same recipe on the
// newest version that records its predecessor.
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { closeDb, db } from '@/lib/db';
import { closeQueue } from '@/lib/jobs/queue';
import { reducedModelsUpstream, rerunRecipe, upstreamChangedVersions } from '@/lib/upstream';
import { accuracySideBySide, reducedModelLineage, sourceModelLineage } from '@/lib/lineage';
import { dashboardActivity, recentActivity } from '@/lib/activity';
import { transitionVersion, versionSummary, type Actor } from '@/lib/review';
import { queueUpstreamNotices, runNotificationRound, setAfterCommitDelivery, updatePreferences } from '@/lib/notifications';
import { startFakeSmtp, type FakeSmtp } from '@/lib/mail/fake-smtp';
import type { UserRow } from '@/lib/people';
import { makeUser, migrateTestDatabase } from './helpers';
import { addReducedVersion, addSourceVersion, makeShelf, markAnalysed, markApproved, SAMPLE_FIGURES } from './fixtures/shelf';

const actor = (u: UserRow): Actor => ({ id: u.id, name: u.name, role: u.role });
let engineer: UserRow;
let reviewer: UserRow;
let smtp: FakeSmtp;

beforeAll(async () => {
  await migrateTestDatabase();
  // The queue rows are what is checked here; they are sent only at the end, so nothing is left pending.
  setAfterCommitDelivery(false);
  smtp = await startFakeSmtp(db(), 0);
  process.env.SMTP_PORT = String(smtp.port);
  engineer = await makeUser({ role: 'engineer', label: 'author' });
  reviewer = await makeUser({ role: 'reviewer', label: 'reviewer' });
});

afterAll(async () => {
  await runNotificationRound();
  await smtp?.close();
  await closeQueue();
  await closeDb();
});

/** Runs the sweep until it has handled this source version (other files' versions may be ahead of it). */
async function sweepUntilNoticed(sourceVersionId: string): Promise<void> {
  for (let i = 0; i < 50; i++) {
    if (await db()('upstream_notices').where({ source_version_id: sourceVersionId }).first()) return;
    await queueUpstreamNotices(100);
  }
  throw new Error(`source version ${sourceVersionId} was never swept`);
}

describe('upstream changed', () => {
  it('marks live versions reduced from an older source version, derived from the version numbers', async () => {
    const shelf = await makeShelf(engineer.id);
    expect((await versionSummary(shelf.version.id))!.upstreamChanged).toBe(false);
    expect(await upstreamChangedVersions({ reducedModelId: shelf.reducedModel.id })).toEqual([]);

    const v2 = await addSourceVersion(shelf.sourceModel.id, engineer.id);
    const summary = (await versionSummary(shelf.version.id))!;
    expect(summary).toMatchObject({ upstreamChanged: true, source: { number: 1 }, newestSourceNumber: 2, newestSourceVersionId: v2.id });
    const listed = await upstreamChangedVersions({ reducedModelId: shelf.reducedModel.id });
    expect(listed).toMatchObject([{ reducedVersionId: shelf.version.id, sourceNumber: 1, newestSourceNumber: 2, rerun: null }]);
    expect((await reducedModelsUpstream([shelf.reducedModel.id])).get(shelf.reducedModel.id)).toMatchObject({ upstreamChanged: true, latestSourceNumber: 1, newestSourceNumber: 2 });

    // A version reduced from the newest source clears the reduced model's flag; the old version keeps its own.
    await addReducedVersion({ reducedModelId: shelf.reducedModel.id, sourceVersionId: v2.id, recipeId: shelf.recipe.id, authorId: engineer.id, predecessorId: shelf.version.id });
    expect((await reducedModelsUpstream([shelf.reducedModel.id])).get(shelf.reducedModel.id)!.upstreamChanged).toBe(false);
    const after = await upstreamChangedVersions({ reducedModelId: shelf.reducedModel.id });
    expect(after).toHaveLength(1);
    expect(after[0].rerun).toMatchObject({ number: 2, status: 'draft' });
  });

  it('leaves retired and sent-back versions out of the list: they are no longer in use', async () => {
    const retired = await makeShelf(engineer.id);
    await markApproved(retired.version.id, reviewer.id);
    await transitionVersion(retired.version.id, 'retire', actor(reviewer), 'Old.');
    await addSourceVersion(retired.sourceModel.id, engineer.id);
    expect(await upstreamChangedVersions({ reducedModelId: retired.reducedModel.id })).toEqual([]);
    expect((await versionSummary(retired.version.id))!.upstreamChanged).toBe(true);
  });

  it('mails each author of derived versions once per new source version, listing their versions', async () => {
    const shelf = await makeShelf(engineer.id);
    const second = await addReducedVersion({ reducedModelId: shelf.reducedModel.id, sourceVersionId: shelf.sourceVersion.id, recipeId: shelf.recipe.id, authorId: engineer.id });
    const colleague = await makeUser({ role: 'engineer', label: 'optout' });
    await updatePreferences(colleague.id, { upstreamChanged: false });
    await addReducedVersion({ reducedModelId: shelf.reducedModel.id, sourceVersionId: shelf.sourceVersion.id, recipeId: shelf.recipe.id, authorId: colleague.id });

    const v2 = await addSourceVersion(shelf.sourceModel.id, reviewer.id);
    await sweepUntilNoticed(v2.id);
    const mails = await db()('mail_queue').where({ kind: 'upstream_changed', recipient_id: engineer.id }).whereLike('dedupe_key', `upstream:${v2.id}:%`);
    expect(mails).toHaveLength(1);
    expect(mails[0].subject).toBe(`Upstream changed: ${shelf.sourceModel.name} has version 2`);
    expect(mails[0].text_body).toContain(`${shelf.reducedModel.name} v1 (reduced from v1); ${shelf.reducedModel.name} v${second.number} (reduced from v1)`);
    expect(mails[0].text_body).toContain(`/lineage/source-models/${shelf.sourceModel.slug}`);
    expect(await db()('mail_queue').where({ recipient_id: colleague.id })).toHaveLength(0);
    expect((await db()('upstream_notices').where({ source_version_id: v2.id }).first()).recipients).toBe(1);

    await queueUpstreamNotices(100);
    expect(await db()('mail_queue').where({ kind: 'upstream_changed', recipient_id: engineer.id }).whereLike('dedupe_key', `upstream:${v2.id}:%`)).toHaveLength(1);
  });
});

describe('re-running the recipe on the new version', () => {
  it('queues one reduction job with the same recipe on the newest source version, recording the predecessor', async () => {
    const shelf = await makeShelf(engineer.id);
    await markApproved(shelf.version.id, reviewer.id);
    const v2 = await addSourceVersion(shelf.sourceModel.id, engineer.id);
    await expect(rerunRecipe(shelf.version.id, actor(engineer))).rejects.toMatchObject({ status: 409, code: 'not_analysed' });
    await markAnalysed(v2.id);

    const first = await rerunRecipe(shelf.version.id, actor(engineer));
    expect(first).toMatchObject({ alreadyQueued: false, sourceVersionId: v2.id, sourceNumber: 2 });
    const job = await db()('jobs').where({ id: first.jobId }).first();
    expect(job).toMatchObject({
      kind: 'reduction',
      status: 'queued',
      subject_type: 'source_version',
      subject_id: v2.id,
      created_by: engineer.id,
      payload: { recipeId: shelf.recipe.id, sourceVersionId: v2.id, target: { kind: 'existing', reducedModelId: shelf.reducedModel.id }, predecessorId: shelf.version.id },
    });
    const audit = await db()('audit_events').where({ subject_id: shelf.version.id, action: 'reduced_version.rerun_requested' }).first();
    expect(audit.details).toMatchObject({ jobId: first.jobId, sourceNumber: 2 });

    const again = await rerunRecipe(shelf.version.id, actor(engineer));
    expect(again).toEqual({ ...first, alreadyQueued: true });

    // Once the job has registered its draft, a further re-run is refused and points at it.
    await db()('jobs').where({ id: first.jobId }).update({ status: 'succeeded' });
    await addReducedVersion({ reducedModelId: shelf.reducedModel.id, sourceVersionId: v2.id, recipeId: shelf.recipe.id, authorId: engineer.id, predecessorId: shelf.version.id });
    await expect(rerunRecipe(shelf.version.id, actor(engineer))).rejects.toMatchObject({ status: 409, code: 'already_rerun' });
  });

  it('refuses a version already on the newest source, and roles other than engineer', async () => {
    const shelf = await makeShelf(engineer.id);
    await expect(rerunRecipe(shelf.version.id, actor(engineer))).rejects.toMatchObject({ status: 409, code: 'not_upstream_changed' });
    await addSourceVersion(shelf.sourceModel.id, engineer.id);
    await expect(rerunRecipe(shelf.version.id, actor(reviewer))).rejects.toMatchObject({ status: 403, code: 'forbidden' });
  });

  it('shows old against new accuracy side by side, and refuses versions of different reduced models', async () => {
    const shelf = await makeShelf(engineer.id);
    const v2 = await addSourceVersion(shelf.sourceModel.id, engineer.id);
    const rerun = await addReducedVersion({
      reducedModelId: shelf.reducedModel.id,
      sourceVersionId: v2.id,
      recipeId: shelf.recipe.id,
      authorId: engineer.id,
      predecessorId: shelf.version.id,
      figures: { ...SAMPLE_FIGURES, hInfinityErrorRelative: 3.4e-3 },
    });
    const pair = await accuracySideBySide(shelf.version.id, rerun.id);
    expect(pair.old.accuracy!.figures.hInfinityErrorRelative).toBe(1.2e-3);
    expect(pair.new.accuracy!.figures.hInfinityErrorRelative).toBe(3.4e-3);
    expect(pair.new.predecessor).toMatchObject({ id: shelf.version.id, sourceNumber: 1 });
    const other = await makeShelf(engineer.id);
    await expect(accuracySideBySide(shelf.version.id, other.version.id)).rejects.toMatchObject({ status: 400 });
  });
});

describe('lineage', () => {
  it('draws source versions → reduced versions → the controller projects pinning them, with re-run edges', async () => {
    const shelf = await makeShelf(engineer.id);
    await markApproved(shelf.version.id, reviewer.id);
    const v2 = await addSourceVersion(shelf.sourceModel.id, engineer.id);
    const rerun = await addReducedVersion({ reducedModelId: shelf.reducedModel.id, sourceVersionId: v2.id, recipeId: shelf.recipe.id, authorId: engineer.id, predecessorId: shelf.version.id });
    const [project] = await db()('controller_projects')
      .insert({ name: `Zone loop ${shelf.reducedModel.slug}`, slug: `loop-${shelf.reducedModel.slug}`, created_by: engineer.id })
      .returning(['id', 'name']);
    await db()('pins').insert({ project_id: project.id, reduced_model_id: shelf.reducedModel.id, mode: 'exact', reduced_version_id: shelf.version.id, created_by: engineer.id });

    const lineage = (await sourceModelLineage(shelf.sourceModel.slug))!;
    const kinds = lineage.nodes.map((n) => [n.kind, n.id]);
    expect(kinds).toEqual([
      ['source_version', shelf.sourceVersion.id],
      ['source_version', v2.id],
      ['reduced_version', shelf.version.id],
      ['reduced_version', rerun.id],
      ['project', project.id],
    ]);
    expect(lineage.edges).toEqual([
      { from: shelf.sourceVersion.id, to: shelf.version.id, kind: 'reduced_from', label: 'balanced truncation, r = 1' },
      { from: v2.id, to: rerun.id, kind: 'reduced_from', label: 'balanced truncation, r = 1' },
      { from: shelf.version.id, to: rerun.id, kind: 'predecessor', label: 'made from' },
      { from: shelf.version.id, to: project.id, kind: 'pinned_by', label: 'exact pin' },
    ]);
    const node = lineage.nodes.find((n) => n.id === shelf.version.id);
    expect(node).toMatchObject({ status: 'approved', upstreamChanged: true, matricesSha256: shelf.version.matrices_sha256, engineVersion: 'test' });

    const ofReduced = (await reducedModelLineage(shelf.reducedModel.slug))!;
    expect(ofReduced.title).toBe(`Lineage of ${shelf.reducedModel.name}`);
    expect(ofReduced.nodes.filter((n) => n.kind === 'reduced_version')).toHaveLength(2);
    expect(await sourceModelLineage('no-such-model')).toBeNull();
  });
});

describe('the Dashboard feed', () => {
  it('shows a reviewer what awaits them, an author what was sent back and what went upstream-changed, and recent events', async () => {
    const author = await makeUser({ role: 'engineer', label: 'feed-author' });
    const waiting = await makeShelf(author.id);
    await transitionVersion(waiting.version.id, 'submit', actor(author), 'For the feed.');
    const sentBack = await makeShelf(author.id);
    await transitionVersion(sentBack.version.id, 'submit', actor(author), 'v1');
    await transitionVersion(sentBack.version.id, 'revise', actor(reviewer), 'Keep the fast mode.');
    const v2 = await addSourceVersion(sentBack.sourceModel.id, reviewer.id);
    const stillLive = await makeShelf(author.id);
    await addSourceVersion(stillLive.sourceModel.id, reviewer.id);

    const forReviewer = await dashboardActivity(actor(reviewer));
    expect(forReviewer.awaitingYourReview.map((q) => q.versionId)).toContain(waiting.version.id);
    // Other files add events at the same time, so the feed is read deeper than the Dashboard's fifteen.
    const recent = await recentActivity(500);
    expect(forReviewer.recent.length).toBeLessThanOrEqual(15);
    expect(recent.some((i) => i.action === 'reduced_version.sent_back_for_revision' && i.subjectId === sentBack.version.id && i.tone === 'revise' && i.detail === 'Keep the fast mode.')).toBe(true);
    expect(recent.some((i) => i.action === 'source_version.uploaded' && i.subjectId === v2.id && i.subject?.label === `${sentBack.sourceModel.name} v${v2.number}`)).toBe(true);

    const forAuthor = await dashboardActivity(actor(author));
    expect(forAuthor.awaitingYourReview).toEqual([]);
    expect(forAuthor.yoursInReview.map((q) => q.versionId)).toEqual([waiting.version.id]);
    expect(forAuthor.sentBackToYou).toMatchObject([{ versionId: sentBack.version.id, comment: 'Keep the fast mode.', reviewerName: reviewer.name }]);
    expect(forAuthor.yourUpstreamChanged.map((u) => u.reducedVersionId)).toEqual([stillLive.version.id]);
    const upstreamItem = (await recentActivity(500)).find((i) => i.action === 'source_version.uploaded' && i.subject?.label.startsWith(stillLive.sourceModel.name));
    expect(upstreamItem).toMatchObject({ upstreamChangedCount: 1 });
  });
});
