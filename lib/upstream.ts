// Upstream changes: reduced-model versions whose source model has a newer version than the one they were
// reduced from. Derived, never stored: the view reduced_version_upstream compares version numbers
// (migration 20261202000200_reviews), so a badge can never disagree with the source versions.
//
// Also here: "re-run the recipe on the new version" (a reduction job with the same recipe on the newest
// source version, recording the old version as predecessor; the old-versus-new comparison of the result is
// in lib/lineage.ts). The "upstream changed" mails to the authors of derived versions are queued by
// lib/notifications/upstream-notices.ts, once per new source version.
import type { Knex } from 'knex';
import { db } from '@/lib/db';
import { recordAudit } from '@/lib/audit';
import { ApiError, notFound } from '@/lib/http';
import type { Role } from '@/lib/roles';
import type { VersionStatus } from '@/lib/review/state-machine';
import { createJob, dispatchJob } from '@/lib/jobs/jobs';
import { versionLineage } from '@/lib/version-lineage';

/** States in which a version still matters enough to be flagged and re-run (not superseded, not retired). */
export const LIVE_STATUSES: readonly VersionStatus[] = ['draft', 'in_review', 'approved'];
export const RERUN_ROLES: readonly Role[] = ['engineer'];

export interface UpstreamChange {
  reducedVersionId: string;
  reducedModelId: string;
  reducedModelName: string;
  reducedModelSlug: string;
  number: number;
  status: VersionStatus;
  authorId: string;
  authorName: string;
  sourceModelId: string;
  sourceModelName: string;
  sourceModelSlug: string;
  sourceNumber: number;
  newestSourceVersionId: string;
  newestSourceNumber: number;
  /** When the newest source version was registered. */
  newestRegisteredAt: string;
  /** A version already made from this one on the newest source version, if any. */
  rerun: { id: string; number: number; status: VersionStatus } | null;
}

export async function upstreamChangedVersions(
  filter: { reducedModelId?: string; sourceModelId?: string; authorId?: string; limit?: number } = {},
  trx: Knex | Knex.Transaction = db(),
): Promise<UpstreamChange[]> {
  const query = versionLineage<{
    authorName: string;
    newestSourceVersionId: string;
    newestSourceNumber: number;
    newestCreatedAt: Date;
    rerunId: string | null;
    rerunNumber: number;
    rerunStatus: VersionStatus;
  }>(trx, {
    authorName: 'au.name',
    newestSourceVersionId: 'up.newest_source_version_id',
    newestSourceNumber: 'up.newest_source_number',
    newestCreatedAt: 'nsv.created_at',
    rerunId: 'nxt.id',
    rerunNumber: 'nxt.number',
    rerunStatus: 'nxt.status',
  }, ['author', 'upstream'])
    .join('source_versions as nsv', 'nsv.id', 'up.newest_source_version_id')
    .leftJoin('reduced_versions as nxt', (j) =>
      j.on('nxt.predecessor_id', 'rv.id').andOn('nxt.source_version_id', 'up.newest_source_version_id'),
    )
    .where('up.upstream_changed', true)
    .whereIn('rv.status', LIVE_STATUSES as string[])
    .orderBy([{ column: 'nsv.created_at', order: 'desc' }, { column: 'rm.name' }, { column: 'rv.number', order: 'desc' }]);
  if (filter.reducedModelId) query.where('rv.reduced_model_id', filter.reducedModelId);
  if (filter.sourceModelId) query.where('sm.id', filter.sourceModelId);
  if (filter.authorId) query.where('rv.author_id', filter.authorId);
  if (filter.limit) query.limit(filter.limit);
  const rows = await query;
  return rows.map((r) => ({
    reducedVersionId: r.versionId,
    reducedModelId: r.reducedModelId,
    reducedModelName: r.reducedModelName,
    reducedModelSlug: r.reducedModelSlug,
    number: r.versionNumber,
    status: r.status,
    authorId: r.authorId,
    authorName: r.authorName,
    sourceModelId: r.sourceModelId,
    sourceModelName: r.sourceModelName,
    sourceModelSlug: r.sourceModelSlug,
    sourceNumber: r.sourceVersionNumber,
    newestSourceVersionId: r.newestSourceVersionId,
    newestSourceNumber: r.newestSourceNumber,
    newestRegisteredAt: r.newestCreatedAt.toISOString(),
    rerun: r.rerunId ? { id: r.rerunId, number: r.rerunNumber, status: r.rerunStatus } : null,
  }));
}

export interface ReducedModelUpstream {
  reducedModelId: string;
  /** The newest version of the reduced model was reduced from an older source version than the newest. */
  upstreamChanged: boolean;
  latestVersionNumber: number;
  latestSourceNumber: number;
  newestSourceNumber: number;
}

/**
 * Per reduced model, for lists: upstream-changed when its newest version is reduced from an older source
 * version. Once a re-run registers a version on the newest source, the model is no longer flagged (its
 * older versions still are, on their own pages).
 */
export async function reducedModelsUpstream(
  reducedModelIds: readonly string[],
  trx: Knex | Knex.Transaction = db(),
): Promise<Map<string, ReducedModelUpstream>> {
  if (reducedModelIds.length === 0) return new Map();
  const rows = await trx('reduced_version_upstream as up')
    .join('reduced_versions as rv', 'rv.id', 'up.reduced_version_id')
    .distinctOn('up.reduced_model_id')
    .whereIn('up.reduced_model_id', reducedModelIds as string[])
    .orderBy([{ column: 'up.reduced_model_id' }, { column: 'rv.number', order: 'desc' }])
    .select('up.reduced_model_id', 'rv.number', 'up.source_number', 'up.newest_source_number', 'up.upstream_changed');
  return new Map(
    rows.map((r) => [
      r.reduced_model_id,
      {
        reducedModelId: r.reduced_model_id,
        upstreamChanged: r.upstream_changed,
        latestVersionNumber: r.number,
        latestSourceNumber: r.source_number,
        newestSourceNumber: r.newest_source_number,
      },
    ]),
  );
}

// ---------------------------------------------------------------------------------------------------------
// Re-running a recipe on the newest source version

export interface RerunRequest {
  jobId: string;
  /** True when an identical re-run was already queued or running; its job is returned instead. */
  alreadyQueued: boolean;
  sourceVersionId: string;
  sourceNumber: number;
}

/**
 * Queues a reduction with the version's recipe on the newest version of its source model, through the jobs
 * of lib/jobs (created in this transaction, handed to the queue after commit). The job registers the result
 * as a new draft version of the same reduced model that records this version as its predecessor, authored
 * by whoever asked for the re-run.
 */
export async function rerunRecipe(versionId: string, actor: { id: string; role: Role }): Promise<RerunRequest> {
  if (!RERUN_ROLES.includes(actor.role)) {
    throw new ApiError(403, 'forbidden', `Your role does not allow re-running a recipe (it needs the ${RERUN_ROLES.join(' or ')} role).`);
  }
  const result = await db().transaction(async (trx) => {
    // Two clicks on the button, or two engineers at once, queue one re-run.
    await trx.raw('SELECT pg_advisory_xact_lock(hashtext(?))', [`rerun:${versionId}`]);
    const row = await trx('reduced_version_upstream as up')
      .join('reduced_versions as rv', 'rv.id', 'up.reduced_version_id')
      .where('rv.id', versionId)
      .first('rv.id', 'rv.number', 'rv.status', 'rv.recipe_id', 'rv.reduced_model_id', 'up.upstream_changed', 'up.newest_source_version_id', 'up.newest_source_number', 'up.source_number');
    if (!row) throw notFound('That reduced model version');
    const newest = { sourceVersionId: row.newest_source_version_id as string, sourceNumber: row.newest_source_number as number };
    if (!row.upstream_changed) {
      throw new ApiError(409, 'not_upstream_changed', `This version was reduced from v${row.source_number}, the newest version of its source model; there is nothing newer to re-run on.`);
    }
    if (!LIVE_STATUSES.includes(row.status)) {
      throw new ApiError(409, 'state_conflict', `This version is ${row.status.replace('_', ' ')}; re-run the recipe from a version that is still in use.`);
    }
    const made = await trx('reduced_versions').where({ predecessor_id: versionId, source_version_id: newest.sourceVersionId }).first('number');
    if (made) {
      throw new ApiError(409, 'already_rerun', `Version ${made.number} is already this recipe re-run on source v${newest.sourceNumber}.`);
    }
    const pending = await trx('jobs')
      .where({ kind: 'reduction' })
      .whereIn('status', ['queued', 'running'])
      .whereRaw(`payload->>'predecessorId' = ?`, [versionId])
      .whereRaw(`payload->>'sourceVersionId' = ?`, [newest.sourceVersionId])
      .first('id');
    if (pending) return { jobId: pending.id as string, alreadyQueued: true, ...newest };
    if (!(await trx('analyses').where({ source_version_id: newest.sourceVersionId }).first('id'))) {
      throw new ApiError(409, 'not_analysed', `Source v${newest.sourceNumber} has not been analysed yet; re-run the recipe once its analysis has finished.`);
    }
    const job = await createJob(trx, {
      kind: 'reduction',
      subjectType: 'source_version',
      subjectId: newest.sourceVersionId,
      payload: {
        recipeId: row.recipe_id,
        sourceVersionId: newest.sourceVersionId,
        target: { kind: 'existing', reducedModelId: row.reduced_model_id },
        predecessorId: versionId,
      },
      createdBy: actor.id,
    });
    await recordAudit(trx, {
      actorId: actor.id,
      action: 'reduced_version.rerun_requested',
      subjectType: 'reduced_version',
      subjectId: versionId,
      details: { jobId: job.id, sourceVersionId: newest.sourceVersionId, sourceNumber: newest.sourceNumber, recipeId: row.recipe_id },
    });
    return { jobId: job.id, alreadyQueued: false, ...newest };
  });
  if (!result.alreadyQueued) await dispatchJob(result.jobId);
  return result;
}
