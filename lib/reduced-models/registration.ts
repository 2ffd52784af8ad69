// Registration of a finished reduction, inside the job's finishing transaction: the reduced model (for a
// first version), the draft version with its matrices, their SHA-256 (lib/checksums.ts), the source
// version's checksum and the engine version, and the accuracy report. A reduction that fails registers
// nothing. The next draft after a revise decision (lib/review/transitions.ts) is written the same way.
import type { Knex } from 'knex';
import { recordAudit } from '@/lib/audit';
import { matricesSha256 } from '@/lib/checksums';
import type { ReductionRecord, ReducedMatricesRecord } from '@/lib/engine-tasks/records';
import type { ReducedModelRow, ReducedVersionRow } from '@/lib/reduced-models/rows';
import type { JobRow } from '@/lib/jobs/jobs';
import { findSourceVersion } from '@/lib/source-models';
import { uniqueSlug } from '@/lib/slug';
import { reducedVersionPath } from '@/lib/reduced-models/paths';
import type { ReductionRequest } from '@/lib/reduced-models/schemas';

/** A draft version as registered: where it comes from, what it holds, and who wrote it. */
interface DraftVersion {
  reducedModelId: string;
  number: number;
  sourceVersionId: string;
  recipeId: string;
  predecessorId: string | null;
  order: number;
  statesKeptUnstable: number;
  matrices: ReducedMatricesRecord;
  matricesSha256: string;
  inputChecksum: string;
  engineVersion: string;
  authorId: string;
}

/** Writes a draft version and its accuracy report (when there is one) in the caller's transaction. */
export async function insertDraftVersion(
  trx: Knex.Transaction,
  v: DraftVersion,
  report: { figures: unknown; curves: unknown; acceptancePassed: boolean | null } | null,
): Promise<{ id: string; number: number }> {
  const [row] = await trx('reduced_versions')
    .insert({
      reduced_model_id: v.reducedModelId,
      number: v.number,
      source_version_id: v.sourceVersionId,
      recipe_id: v.recipeId,
      predecessor_id: v.predecessorId,
      status: 'draft',
      order: v.order,
      states_kept_unstable: v.statesKeptUnstable,
      matrices: JSON.stringify(v.matrices),
      matrices_sha256: v.matricesSha256,
      input_checksum: v.inputChecksum,
      engine_version: v.engineVersion,
      author_id: v.authorId,
    })
    .returning(['id', 'number']);
  if (report) {
    await trx('accuracy_reports').insert({
      reduced_version_id: row.id,
      figures: JSON.stringify(report.figures),
      curves: JSON.stringify(report.curves),
      acceptance_passed: report.acceptancePassed,
    });
  }
  return { id: row.id as string, number: row.number as number };
}

export interface RegisteredReduction {
  reducedModelId: string;
  reducedModelSlug: string;
  reducedVersionId: string;
  number: number;
  url: string;
}

export async function registerReducedVersion(
  trx: Knex.Transaction,
  job: Pick<JobRow, 'id' | 'created_by' | 'payload'>,
  record: ReductionRecord,
): Promise<RegisteredReduction> {
  // predecessorId: set by a re-run of a recipe on a newer source version (lib/upstream.ts); otherwise the
  // version this one follows is the reduced model's newest.
  const payload = job.payload as { recipeId: string; sourceVersionId: string; target: ReductionRequest['target']; predecessorId?: string };
  const version = await findSourceVersion(payload.sourceVersionId, trx);
  if (!version) throw new Error(`reduction job ${job.id}: source version ${payload.sourceVersionId} is gone`);
  const author = job.created_by ?? version.uploaded_by;
  let model: ReducedModelRow;
  if (payload.target.kind === 'new') {
    [model] = await trx<ReducedModelRow>('reduced_models')
      .insert({
        name: payload.target.name,
        slug: await uniqueSlug(trx, 'reduced_models', payload.target.name, 'model'),
        description: payload.target.description,
        source_model_id: version.source_model_id,
        created_by: author,
      })
      .returning('*');
  } else {
    // Locked so two reductions finishing at once number their versions one after the other.
    const found = await trx<ReducedModelRow>('reduced_models').where({ id: payload.target.reducedModelId }).forUpdate().first();
    if (!found) throw new Error(`reduction job ${job.id}: reduced model ${payload.target.reducedModelId} is gone`);
    model = found;
  }
  const previous = await trx<ReducedVersionRow>('reduced_versions').where({ reduced_model_id: model.id }).orderBy('number', 'desc').first();
  const number = (previous?.number ?? 0) + 1;
  const digest = matricesSha256(record.matrices);
  const row = await insertDraftVersion(
    trx,
    {
      reducedModelId: model.id,
      number,
      sourceVersionId: version.id,
      recipeId: payload.recipeId,
      predecessorId: payload.predecessorId ?? previous?.id ?? null,
      order: record.order,
      statesKeptUnstable: record.unstableStatesKept,
      matrices: record.matrices,
      matricesSha256: digest,
      inputChecksum: version.checksum,
      engineVersion: record.engineVersion,
      authorId: author,
    },
    { figures: record.figures, curves: record.curves, acceptancePassed: record.acceptancePassed },
  );
  await recordAudit(trx, {
    actorId: author,
    action: 'reduced_version.registered',
    subjectType: 'reduced_version',
    subjectId: row.id,
    details: {
      reducedModel: model.slug,
      number,
      sourceVersionId: version.id,
      recipeId: payload.recipeId,
      order: record.order,
      matricesSha256: digest,
      jobId: job.id,
    },
  });
  return { reducedModelId: model.id, reducedModelSlug: model.slug, reducedVersionId: row.id, number, url: reducedVersionPath(model.slug, number) };
}
