// Reduced models and their numbered versions: the recipe a person runs, the draft version a
// finished reduction registers with its accuracy report, and the reads behind the reduced-model pages and
// the comparison page. Status changes after draft (review, approval, retirement) live in lib/review.
//
// A reduction is requested in one transaction (its recipe and its job) and registered in another, the
// job's finishing transaction: the reduced model (for a first version), the version with its matrices,
// their SHA-256 (lib/checksums.ts), the source version's checksum and the engine version, and the
// accuracy report. A reduction that fails registers nothing.
import type { Knex } from 'knex';
import { z } from 'zod';
import { db } from '@/lib/db';
import { recordAudit } from '@/lib/audit';
import { storedAcceptance, type StoredAcceptance } from '@/lib/acceptance';
import { ApiError, notFound } from '@/lib/http';
import type { SessionUser } from '@/lib/auth';
import { matricesSha256 } from '@/lib/checksums';
import { TIME_BASE_SECONDS } from '@/lib/exports/discrete';
import { receiveUpload } from '@/lib/uploads/receive';
import { releaseFiles, storeFile, type StoredFile } from '@/lib/uploads/store';
import { validateSignalInChildProcess } from '@/lib/engine-tasks/validate-process';
import type { AccuracyFiguresRecord, InputResponseRecord, ReductionCurves, ReductionRecord, ReducedMatricesRecord } from '@/lib/engine-tasks/records';
import type { RecipeInput } from '@/lib/engine-tasks/reduction-task';
import { createJob, dispatchJob, latestJobFor, toJobView, type JobRow, type JobView } from '@/lib/jobs/jobs';
import { analysisOf, findSourceVersion, slugFromName, versionPath, type SourceModelRow, type SourceVersionRow } from '@/lib/source-models';

// ---------------------------------------------------------------------------------------------------
// The recipe form

const positiveFrequency = (what: string) =>
  z.number({ error: `${what} must be a number (rad per time unit).` }).positive(`${what} must be above 0.`).finite(`${what} must be finite.`);

const bandSchema = z
  .object({ minFrequency: positiveFrequency('The lowest frequency'), maxFrequency: positiveFrequency('The highest frequency') })
  .refine((b) => b.maxFrequency > b.minFrequency, { message: 'The highest frequency must be above the lowest.', path: ['maxFrequency'] });

/**
 * The band of frequency-limited balanced truncation as the person entered it: 0 ≤ from < to, finite, in rad
 * per model time unit ('rad') or in Hz ('hz', cycles per second). Converted to rad per time unit by
 * limitedBandInRadians once the model's time unit is known.
 */
export const limitedBandSchema = z
  .object({
    minFrequency: z
      .number({ error: 'The band’s lower edge must be a finite number.' })
      .finite('The band’s lower edge must be finite.')
      .min(0, 'The band’s lower edge must be 0 or above.'),
    maxFrequency: z
      .number({ error: 'The band’s upper edge must be a finite number.' })
      .finite('The band’s upper edge must be finite.')
      .positive('The band’s upper edge must be above 0.'),
    unit: z.enum(['rad', 'hz'], { error: 'The band’s unit must be rad (per model time unit) or hz.' }).default('rad'),
  })
  .refine((b) => b.maxFrequency > b.minFrequency, { message: 'The band’s upper edge must be above its lower edge.', path: ['maxFrequency'] });
export type LimitedBandInput = z.infer<typeof limitedBandSchema>;

export const RECIPE_METHODS = ['balanced', 'residualization', 'modal', 'frequency-limited'] as const;
export type RecipeMethod = (typeof RECIPE_METHODS)[number];

export const recipeSchema = z
  .object({
    method: z.enum(RECIPE_METHODS, { error: 'Method must be balanced, residualization, modal or frequency-limited.' }),
    orderRule: z.enum(['order', 'tolerance'], { error: 'Choose the order by number or by tolerance.' }),
    order: z.number({ error: 'The order must be a number.' }).int('The order must be a whole number.').min(1, 'Keep at least 1 state.').optional(),
    tolerance: z
      .number({ error: 'The tolerance must be a number.' })
      .positive('The tolerance must be above 0.')
      .max(1, 'The tolerance is relative to ‖G‖∞; give a value at most 1.')
      .optional(),
    modalSelection: z.enum(['dominance', 'slowest', 'band'], { error: 'The selection rule must be dominance, slowest or band.' }).default('dominance'),
    band: bandSchema.optional(),
    /** frequency-limited balanced truncation: the band to balance on */
    limitedBand: limitedBandSchema.optional(),
    acceptance: z
      .object({
        minFrequency: positiveFrequency('The acceptance band’s lowest frequency'),
        maxFrequency: positiveFrequency('The acceptance band’s highest frequency'),
        maxError: z.number({ error: 'The largest error must be a number.' }).positive('The largest error must be above 0.').finite(),
      })
      .refine((b) => b.maxFrequency > b.minFrequency, { message: 'The highest frequency must be above the lowest.', path: ['maxFrequency'] })
      .optional(),
  })
  .superRefine((r, ctx) => {
    if (r.method === 'frequency-limited') {
      if (r.orderRule === 'tolerance') {
        ctx.addIssue({
          code: 'custom',
          path: ['orderRule'],
          message: 'Frequency-limited balanced truncation has no a-priori error bound to meet a tolerance; choose the order by number of states.',
        });
      }
      if (!r.limitedBand) ctx.addIssue({ code: 'custom', path: ['limitedBand'], message: 'Frequency-limited balanced truncation needs the band to balance on.' });
    } else if (r.limitedBand) {
      ctx.addIssue({ code: 'custom', path: ['limitedBand'], message: 'A band to balance on applies to frequency-limited balanced truncation only.' });
    }
    if (r.orderRule === 'order' && r.order === undefined) ctx.addIssue({ code: 'custom', path: ['order'], message: 'Give the number of states to keep.' });
    if (r.orderRule === 'tolerance' && r.tolerance === undefined) ctx.addIssue({ code: 'custom', path: ['tolerance'], message: 'Give the tolerance the bound must meet.' });
    if (r.method === 'modal' && r.modalSelection === 'band' && !r.band) ctx.addIssue({ code: 'custom', path: ['band'], message: 'The band rule needs a frequency band.' });
  });

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

const targetSchema = z.discriminatedUnion('kind', [
  z.object({
    kind: z.literal('new'),
    name: z.string({ error: 'Name the reduced model.' }).trim().min(1, 'Name the reduced model.').max(120, 'The name must be at most 120 characters.'),
    description: z.string().trim().max(4000, 'The description must be at most 4000 characters.').default(''),
  }),
  z.object({ kind: z.literal('existing'), reducedModelId: z.uuid({ error: 'Choose the reduced model to add a version to.' }) }),
]);

export const reductionRequestSchema = z.object({
  sourceVersionId: z.uuid({ error: 'The source version id must be a UUID.' }),
  recipe: recipeSchema,
  target: targetSchema,
});
export type ReductionRequest = z.infer<typeof reductionRequestSchema>;

export interface RecipeRow {
  id: string;
  method: RecipeMethod;
  order: number | null;
  tolerance: number | null;
  /**
   * modal: { selection, band? }. frequency-limited: { band } in rad per model time unit (what the engine
   * used) and { enteredBand } as the person gave it (its unit, 'rad' or 'hz'), for display.
   */
  options: {
    selection?: 'dominance' | 'slowest' | 'band';
    band?: { minFrequency: number; maxFrequency: number };
    enteredBand?: { minFrequency: number; maxFrequency: number; unit: 'rad' | 'hz' };
  };
  acceptance: { minFrequency: number; maxFrequency: number; maxError: number } | null;
  created_by: string;
  created_at: Date;
}

export function recipeInputOf(row: RecipeRow): RecipeInput {
  return {
    method: row.method,
    order: row.order,
    tolerance: row.tolerance,
    modal: row.method === 'modal' ? { selection: row.options.selection ?? 'dominance', band: row.options.band } : null,
    limitedBand: row.method === 'frequency-limited' ? (row.options.band ?? null) : null,
    acceptance: row.acceptance,
  };
}

// ---------------------------------------------------------------------------------------------------
// A controller project's acceptance band as the reduce page's starting band

/** Seconds in one model time unit when its length is known (lib/exports/discrete.ts), else null. */
export function timeBaseSeconds(timeBase: string): number | null {
  return TIME_BASE_SECONDS[timeBase.trim()] ?? null;
}

export interface ProjectBandSeed {
  projectName: string;
  projectSlug: string;
  /** rad per the model's time unit */
  minFrequency: number;
  maxFrequency: number;
  maxError: number | null;
}

/**
 * The acceptance band of the controller project named by `projectSlug`, in rad per the model's time unit
 * (the project keeps rad/s): null when there is no such project, it has no band, or the model's time unit
 * has no known length (the band cannot be converted then). Any signed-in person reads projects.
 */
export async function projectBandSeed(projectSlug: string | undefined, timeBase: string): Promise<ProjectBandSeed | null> {
  if (!projectSlug || !/^[a-z0-9]+(-[a-z0-9]+)*$/.test(projectSlug) || projectSlug.length > 60) return null;
  const row = await db()('controller_projects')
    .where({ slug: projectSlug })
    .first('name', 'slug', 'acceptance_min_frequency', 'acceptance_max_frequency', 'acceptance_max_error');
  if (!row || row.acceptance_min_frequency === null || row.acceptance_max_frequency === null) return null;
  const seconds = timeBaseSeconds(timeBase);
  if (seconds === null) return null;
  return {
    projectName: row.name,
    projectSlug: row.slug,
    minFrequency: row.acceptance_min_frequency * seconds,
    maxFrequency: row.acceptance_max_frequency * seconds,
    maxError: row.acceptance_max_error,
  };
}

/** For a project page: the newest version of each source model its pins were reduced from, to reduce again for its band. */
export async function pinnedSourcesOfProject(projectId: string): Promise<{ name: string; slug: string; versionNumber: number }[]> {
  const rows = await db()('pins as p')
    .join('reduced_models as rm', 'rm.id', 'p.reduced_model_id')
    .join('source_models as sm', 'sm.id', 'rm.source_model_id')
    .where('p.project_id', projectId)
    .distinct('sm.id', 'sm.name', 'sm.slug', db().raw('(SELECT max(number) FROM source_versions sv WHERE sv.source_model_id = sm.id) AS latest'))
    .orderBy('sm.name');
  return rows.map((r: Record<string, unknown>) => ({ name: r.name as string, slug: r.slug as string, versionNumber: Number(r.latest) }));
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
// Registration of a finished reduction (called inside the job's finishing transaction)

export interface ReducedModelRow {
  id: string;
  name: string;
  slug: string;
  description: string;
  source_model_id: string;
  created_by: string;
  created_at: Date;
}

export interface ReducedVersionRow {
  id: string;
  reduced_model_id: string;
  number: number;
  source_version_id: string;
  recipe_id: string;
  predecessor_id: string | null;
  status: string;
  order: number;
  states_kept_unstable: number;
  matrices: ReducedMatricesRecord;
  matrices_sha256: string;
  input_checksum: string;
  engine_version: string;
  author_id: string;
  created_at: Date;
  updated_at: Date;
}

export function reducedVersionPath(slug: string, number: number): string {
  return `/reduced-models/${slug}/versions/${number}`;
}

async function uniqueReducedSlug(trx: Knex.Transaction, name: string): Promise<string> {
  const base = slugFromName(name);
  const taken = new Set((await trx('reduced_models').where('slug', base).orWhere('slug', 'like', `${base}-%`).pluck('slug')) as string[]);
  if (!taken.has(base)) return base;
  for (let k = 2; ; k++) if (!taken.has(`${base}-${k}`)) return `${base}-${k}`;
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
        slug: await uniqueReducedSlug(trx, payload.target.name),
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
  const [row] = await trx<ReducedVersionRow>('reduced_versions')
    .insert({
      reduced_model_id: model.id,
      number,
      source_version_id: version.id,
      recipe_id: payload.recipeId,
      predecessor_id: payload.predecessorId ?? previous?.id ?? null,
      status: 'draft',
      order: record.order,
      states_kept_unstable: record.unstableStatesKept,
      matrices: JSON.stringify(record.matrices) as never,
      matrices_sha256: matricesSha256(record.matrices),
      input_checksum: version.checksum,
      engine_version: record.engineVersion,
      author_id: author,
    })
    .returning('*');
  await trx('accuracy_reports').insert({
    reduced_version_id: row.id,
    figures: JSON.stringify(record.figures),
    curves: JSON.stringify(record.curves),
    acceptance_passed: record.acceptancePassed,
  });
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
      matricesSha256: row.matrices_sha256,
      jobId: job.id,
    },
  });
  return { reducedModelId: model.id, reducedModelSlug: model.slug, reducedVersionId: row.id, number, url: reducedVersionPath(model.slug, number) };
}

// ---------------------------------------------------------------------------------------------------
// Reads

export interface ReducedModelListRow {
  id: string;
  name: string;
  slug: string;
  sourceModel: { name: string; slug: string };
  latestVersion: number;
  status: string;
  order: number;
  method: string;
  hInfinityErrorRelative: number | null;
  acceptancePassed: boolean | null;
  /** the latest version's stored acceptance verdict (lib/acceptance.ts); null when its recipe set no band */
  acceptance: StoredAcceptance | null;
  author: string;
  updatedAt: string;
}

export async function listReducedModels(): Promise<ReducedModelListRow[]> {
  const result = await db().raw(`
    SELECT rm.id, rm.name, rm.slug, sm.name AS source_name, sm.slug AS source_slug,
           l.number, l.status, l."order", r.method, l.created_at, u.name AS author,
           CASE WHEN jsonb_typeof(ar.figures->'hInfinityErrorRelative') = 'number' THEN (ar.figures->>'hInfinityErrorRelative')::float8 END AS rel,
           ar.acceptance_passed, ar.figures->'acceptance' AS acceptance_record
    FROM reduced_models rm
    JOIN source_models sm ON sm.id = rm.source_model_id
    JOIN LATERAL (SELECT * FROM reduced_versions rv WHERE rv.reduced_model_id = rm.id ORDER BY rv.number DESC LIMIT 1) l ON TRUE
    JOIN recipes r ON r.id = l.recipe_id
    JOIN users u ON u.id = l.author_id
    LEFT JOIN accuracy_reports ar ON ar.reduced_version_id = l.id
    ORDER BY l.created_at DESC`);
  return result.rows.map((r: Record<string, unknown>) => ({
    id: r.id as string,
    name: r.name as string,
    slug: r.slug as string,
    sourceModel: { name: r.source_name as string, slug: r.source_slug as string },
    latestVersion: r.number as number,
    status: r.status as string,
    order: r.order as number,
    method: r.method as string,
    hInfinityErrorRelative: (r.rel as number | null) ?? null,
    acceptancePassed: (r.acceptance_passed as boolean | null) ?? null,
    acceptance: storedAcceptance(r.acceptance_record ? { acceptance: r.acceptance_record } : null, (r.acceptance_passed as boolean | null) ?? null),
    author: r.author as string,
    updatedAt: new Date(r.created_at as string).toISOString(),
  }));
}

export interface ReducedModelView {
  id: string;
  name: string;
  slug: string;
  description: string;
  sourceModel: { id: string; name: string; slug: string };
}

export interface ReducedVersionSummary {
  id: string;
  number: number;
  status: string;
  order: number;
  method: string;
  sourceVersionNumber: number;
  matricesSha256: string;
  hInfinityErrorRelative: number | null;
  errorBound: number | null;
  acceptancePassed: boolean | null;
  /** the stored acceptance verdict (lib/acceptance.ts); null when the recipe set no band */
  acceptance: StoredAcceptance | null;
  author: string;
  createdAt: string;
}

export async function getReducedModel(slug: string): Promise<{ model: ReducedModelView; versions: ReducedVersionSummary[] } | null> {
  const row = await db()('reduced_models as rm')
    .join('source_models as sm', 'sm.id', 'rm.source_model_id')
    .where('rm.slug', slug)
    .first('rm.*', 'sm.name as source_name', 'sm.slug as source_slug');
  if (!row) return null;
  const versions = await db()('reduced_versions as rv')
    .join('recipes as r', 'r.id', 'rv.recipe_id')
    .join('source_versions as sv', 'sv.id', 'rv.source_version_id')
    .join('users as u', 'u.id', 'rv.author_id')
    .leftJoin('accuracy_reports as ar', 'ar.reduced_version_id', 'rv.id')
    .where('rv.reduced_model_id', row.id)
    .orderBy('rv.number', 'desc')
    .select('rv.id', 'rv.number', 'rv.status', 'rv.order', 'r.method', 'sv.number as source_number', 'rv.matrices_sha256', 'u.name as author', 'rv.created_at', 'ar.figures', 'ar.acceptance_passed');
  return {
    model: {
      id: row.id,
      name: row.name,
      slug: row.slug,
      description: row.description,
      sourceModel: { id: row.source_model_id, name: row.source_name, slug: row.source_slug },
    },
    versions: versions.map((v: Record<string, unknown>) => {
      const figures = (v.figures ?? {}) as Partial<AccuracyFiguresRecord>;
      return {
        id: v.id as string,
        number: v.number as number,
        status: v.status as string,
        order: v.order as number,
        method: v.method as string,
        sourceVersionNumber: v.source_number as number,
        matricesSha256: v.matrices_sha256 as string,
        hInfinityErrorRelative: figures.hInfinityErrorRelative ?? null,
        errorBound: figures.errorBound ?? null,
        acceptancePassed: (v.acceptance_passed as boolean | null) ?? null,
        acceptance: v.figures ? storedAcceptance(v.figures, (v.acceptance_passed as boolean | null) ?? null) : null,
        author: v.author as string,
        createdAt: new Date(v.created_at as string).toISOString(),
      };
    }),
  };
}

export interface ComparisonPageData {
  model: ReducedModelView;
  version: ReducedVersionSummary & { engineVersion: string; inputChecksum: string; matrices: ReducedMatricesRecord };
  recipe: RecipeRow;
  source: { modelName: string; modelSlug: string; versionNumber: number; versionId: string; checksum: string; timeBase: string; inputLabels: string[] | null; outputLabels: string[] | null; url: string };
  figures: AccuracyFiguresRecord;
  curves: ReductionCurves;
  responseJob: JobView | null;
}

export async function getComparisonPage(slug: string, number: number): Promise<ComparisonPageData | null> {
  const found = await getReducedModel(slug);
  if (!found) return null;
  const summary = found.versions.find((v) => v.number === number);
  if (!summary) return null;
  const row = (await db()<ReducedVersionRow>('reduced_versions').where({ id: summary.id }).first())!;
  const recipe = (await db()<RecipeRow>('recipes').where({ id: row.recipe_id }).first())!;
  const report = await db()('accuracy_reports').where({ reduced_version_id: row.id }).first('figures', 'curves');
  const sourceVersion = (await db()<SourceVersionRow>('source_versions').where({ id: row.source_version_id }).first())!;
  const sourceModel = (await db()<SourceModelRow>('source_models').where({ id: sourceVersion.source_model_id }).first())!;
  const analysis = await analysisOf(sourceVersion.id);
  return {
    model: found.model,
    version: { ...summary, engineVersion: row.engine_version, inputChecksum: row.input_checksum, matrices: row.matrices },
    recipe,
    source: {
      modelName: sourceModel.name,
      modelSlug: sourceModel.slug,
      versionNumber: sourceVersion.number,
      versionId: sourceVersion.id,
      checksum: sourceVersion.checksum,
      timeBase: sourceModel.time_base,
      inputLabels: analysis?.labels?.inputs ?? null,
      outputLabels: analysis?.labels?.outputs ?? null,
      url: versionPath(sourceModel.slug, sourceVersion.number),
    },
    figures: report.figures as AccuracyFiguresRecord,
    curves: report.curves as ReductionCurves,
    responseJob: await latestJobFor('response', 'reduced_version', row.id),
  };
}

/** Reduced models made from a source model, for the "add a version to" choice of the recipe form. */
export async function reducedModelsOfSource(sourceModelId: string): Promise<{ id: string; name: string; slug: string; latestVersion: number }[]> {
  const rows = await db()('reduced_models as rm')
    .where('rm.source_model_id', sourceModelId)
    .select('rm.id', 'rm.name', 'rm.slug', db().raw('(SELECT max(number) FROM reduced_versions rv WHERE rv.reduced_model_id = rm.id) AS latest'))
    .orderBy('rm.name');
  return rows.map((r: Record<string, unknown>) => ({ id: r.id as string, name: r.name as string, slug: r.slug as string, latestVersion: Number(r.latest ?? 0) }));
}

export async function findReducedVersion(id: string, trx: Knex | Knex.Transaction = db()): Promise<ReducedVersionRow | undefined> {
  return trx<ReducedVersionRow>('reduced_versions').where({ id }).first();
}

// ---------------------------------------------------------------------------------------------------
// The comparison page's optional input signal

export const signalFieldsSchema = z.object({ reducedVersionId: z.uuid({ error: 'The reduced version id must be a UUID.' }) });

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

