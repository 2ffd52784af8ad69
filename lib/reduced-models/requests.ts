// The requests that start work on reduced models: a recipe run (the recipe and its reduction job, in one
// transaction; the draft version appears when the job finishes, lib/reduced-models/registration.ts) and an
// input signal for the comparison page (checked, stored and queued as a response job).
import { db } from '@/lib/db';
import { recordAudit } from '@/lib/audit';
import { ApiError } from '@/lib/http';
import type { SessionUser } from '@/lib/auth';
import { TIME_BASE_SECONDS } from '@/lib/exports/discrete';
import { receiveUpload } from '@/lib/uploads/receive';
import { releaseFiles, storeFile, type StoredFile } from '@/lib/uploads/store';
import { validateSignalInChildProcess } from '@/lib/engine-tasks/validate-process';
import { createJob, dispatchJob, toJobView, type JobView } from '@/lib/jobs/jobs';
import { analysisOf, findSourceVersion } from '@/lib/source-models';
import { signalFieldsSchema, type LimitedBandInput, type ReductionRequest } from '@/lib/reduced-models/schemas';
import type { RecipeRow } from '@/lib/reduced-models/rows';
import { findReducedVersion } from '@/lib/reduced-models/queries';
import type { AnalysisRecord } from '@/lib/engine-tasks/records';

/**
 * The entered band in rad per model time unit (what the engine works in): rad as given; Hz times 2π and the
 * seconds in one time unit. Throws a 400 ApiError naming the field when Hz cannot be converted (a time unit
 * of unknown length) or the converted band is not finite.
 */
export function limitedBandInRadians(band: LimitedBandInput, timeBase: string): { minFrequency: number; maxFrequency: number } {
  if (band.unit === 'rad') return { minFrequency: band.minFrequency, maxFrequency: band.maxFrequency };
  const seconds = TIME_BASE_SECONDS[timeBase.trim()];
  if (seconds === undefined) {
    throw new ApiError(
      400,
      'invalid_request',
      `Hz cannot be converted for a model whose time unit is “${timeBase}” (not one of ${Object.keys(TIME_BASE_SECONDS).join(', ')}); give the band in rad/${timeBase}.`,
      'recipe.limitedBand.unit',
    );
  }
  const factor = 2 * Math.PI * seconds;
  const out = { minFrequency: band.minFrequency * factor, maxFrequency: band.maxFrequency * factor };
  if (!Number.isFinite(out.maxFrequency)) {
    throw new ApiError(400, 'invalid_request', 'The band’s upper edge is too large.', 'recipe.limitedBand.maxFrequency');
  }
  return out;
}

/**
 * What the large-model path (lib/engine-tasks/sparse-reduction-task.ts) does not offer, refused before
 * anything is written: modal truncation's band rule, the tolerance rule (its bounds are estimates over the
 * leading Hankel values: the order is chosen on the slider), and an order past what the analysis resolved
 * for the balanced methods (frequency-limited balanced truncation starts from a balanced model of the
 * resolved values, so its order must be below their count).
 */
function refuseOffTheLargeModelPath(recipe: ReductionRequest['recipe'], analysis: AnalysisRecord): void {
  if (recipe.method === 'modal' && recipe.modalSelection === 'band') {
    throw new ApiError(400, 'invalid_request', 'On the large-model path modal truncation keeps the most dominant or the slowest modes; the band rule is not offered.', 'recipe.modalSelection');
  }
  if (recipe.orderRule === 'tolerance') {
    throw new ApiError(400, 'invalid_request', 'On the large-model path choose the order by number of states: each order’s estimated bound is shown on the slider.', 'recipe.orderRule');
  }
  const resolved = analysis.hankelSingularValues.length;
  if ((recipe.method === 'balanced' || recipe.method === 'residualization') && recipe.order! > resolved) {
    throw new ApiError(400, 'invalid_request', `The order ${recipe.order} is past the ${resolved} Hankel singular values the low-rank gramians resolve; keep at most ${resolved} states.`, 'recipe.order');
  }
  if (recipe.method === 'frequency-limited' && recipe.order! >= resolved) {
    throw new ApiError(
      400,
      'invalid_request',
      `On the large-model path frequency-limited balanced truncation starts from the balanced model of the ${resolved} resolved Hankel singular values; keep fewer than ${resolved} states.`,
      'recipe.order',
    );
  }
}

/** Registers the recipe and its reduction job; the draft version appears when the job finishes. */
export async function requestReduction(input: ReductionRequest, user: SessionUser): Promise<{ job: JobView; recipeId: string }> {
  const version = await findSourceVersion(input.sourceVersionId);
  if (!version) throw new ApiError(404, 'not_found', 'The source version was not found.', 'sourceVersionId');
  const analysis = await analysisOf(version.id);
  if (!analysis) {
    throw new ApiError(409, 'not_analysed', 'The source version has not been analysed yet; run the recipe once its analysis has finished.', 'sourceVersionId');
  }
  const { recipe } = input;
  if (recipe.orderRule === 'order' && recipe.order! > version.states) {
    throw new ApiError(400, 'invalid_request', `The order ${recipe.order} is larger than the model (${version.states} states).`, 'recipe.order');
  }
  if (analysis.path === 'sparse') refuseOffTheLargeModelPath(recipe, analysis);
  const keptExactly = analysis.marginalPoles + analysis.unstablePoles;
  if (recipe.method === 'frequency-limited' && recipe.order! < keptExactly) {
    throw new ApiError(
      400,
      'invalid_request',
      `The order ${recipe.order} is below the ${keptExactly} states kept exactly for marginal and unstable poles.`,
      'recipe.order',
    );
  }
  let options: RecipeRow['options'] = {};
  if (recipe.method === 'modal') options = { selection: recipe.modalSelection, ...(recipe.band ? { band: recipe.band } : {}) };
  if (recipe.method === 'frequency-limited') {
    const timeBase = (await db()('source_models').where({ id: version.source_model_id }).first('time_base'))?.time_base ?? 's';
    options = { band: limitedBandInRadians(recipe.limitedBand!, timeBase), enteredBand: recipe.limitedBand! };
  }
  if (input.target.kind === 'existing') {
    const target = await db()('reduced_models').where({ id: input.target.reducedModelId }).first();
    if (!target) throw new ApiError(404, 'not_found', 'The reduced model to add a version to was not found.', 'target.reducedModelId');
    if (target.source_model_id !== version.source_model_id) {
      throw new ApiError(400, 'invalid_request', 'A new version must come from the same source model as the reduced model’s earlier versions.', 'target.reducedModelId');
    }
  }
  const created = await db().transaction(async (trx) => {
    const [row] = await trx<RecipeRow>('recipes')
      .insert({
        method: recipe.method,
        order: recipe.orderRule === 'order' ? recipe.order! : null,
        tolerance: recipe.orderRule === 'tolerance' ? recipe.tolerance! : null,
        options: JSON.stringify(options) as never,
        acceptance: (recipe.acceptance ? JSON.stringify(recipe.acceptance) : null) as never,
        created_by: user.id,
      })
      .returning('*');
    const job = await createJob(trx, {
      kind: 'reduction',
      subjectType: 'source_version',
      subjectId: version.id,
      payload: { recipeId: row.id, sourceVersionId: version.id, target: input.target },
      createdBy: user.id,
    });
    await recordAudit(trx, {
      actorId: user.id,
      action: 'reduction.requested',
      subjectType: 'source_version',
      subjectId: version.id,
      details: {
        recipeId: row.id,
        method: recipe.method,
        order: row.order,
        tolerance: row.tolerance,
        ...(options.enteredBand ? { band: options.band, enteredBand: options.enteredBand } : {}),
        jobId: job.id,
      },
    });
    return { recipeId: row.id, job };
  });
  await dispatchJob(created.job.id);
  return { recipeId: created.recipeId, job: toJobView(created.job) };
}

// ---------------------------------------------------------------------------------------------------
// The comparison page's optional input signal

async function signalKeyInUse(key: string): Promise<boolean> {
  const row = await db()('jobs').whereRaw(`payload->>'signalStorageKey' = ?`, [key]).first('id');
  if (row) return true;
  return Boolean(await db()('source_versions').whereRaw(`files @> ?::jsonb`, [JSON.stringify([{ storageKey: key }])]).first('id'));
}

/** Receives an input-signal CSV, checks it against the model's inputs and queues its response job. */
export async function requestInputResponse(request: Request, user: SessionUser): Promise<{ job: JobView }> {
  const upload = await receiveUpload(request, { fileFields: ['signal'] });
  let stored: StoredFile | null = null;
  try {
    const parsed = signalFieldsSchema.safeParse(upload.fields);
    if (!parsed.success) {
      const issue = parsed.error.issues[0];
      throw new ApiError(400, 'invalid_request', issue.message, issue.path.map(String).join('.'));
    }
    const version = await findReducedVersion(parsed.data.reducedVersionId);
    if (!version) throw new ApiError(404, 'not_found', 'The reduced version was not found.', 'reducedVersionId');
    const file = upload.files.signal;
    if (!file) throw new ApiError(400, 'missing_file', 'Choose a CSV file: time in the first column, then one column per input.', 'signal');
    const inputs = version.matrices.B[0]?.length ?? 0;
    const check = await validateSignalInChildProcess({ path: file.tempPath, name: file.originalName }, inputs).catch((e: Error) => {
      throw new ApiError(422, 'check_failed', `The input signal could not be checked: ${e.message}`, 'signal');
    });
    if (!check.ok) throw new ApiError(422, `invalid_signal_${check.error.code}`, check.error.message, 'signal');
    stored = await storeFile(file.tempPath, file.sha256, 'signal');
    const storageKey = stored.storageKey;
    const job = await db().transaction(async (trx) => {
      const row = await createJob(trx, {
        kind: 'response',
        subjectType: 'reduced_version',
        subjectId: version.id,
        payload: { reducedVersionId: version.id, signalStorageKey: storageKey, signalName: file.originalName },
        createdBy: user.id,
      });
      await recordAudit(trx, {
        actorId: user.id,
        action: 'input_response.requested',
        subjectType: 'reduced_version',
        subjectId: version.id,
        details: { jobId: row.id, signal: file.originalName, sha256: file.sha256 },
      });
      return row;
    });
    await dispatchJob(job.id);
    return { job: toJobView(job) };
  } catch (err) {
    if (stored) await releaseFiles([stored], signalKeyInUse);
    throw err;
  } finally {
    await upload.discard();
  }
}

/** The response job's input signal by its key in the store (the worker fetches it: lib/storage/scratch.ts). */
export function signalPathOf(payload: Record<string, unknown>): { storageKey: string; name: string } {
  return { storageKey: String(payload.signalStorageKey), name: String(payload.signalName ?? 'signal.csv') };
}

