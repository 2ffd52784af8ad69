// The reads behind the reduced-model pages and the comparison page, the reduce page's choices (reduced models
// of a source, a controller project's band as the starting band) and a version's row for the jobs.
import type { Knex } from 'knex';
import { db } from '@/lib/db';
import { storedAcceptance, type StoredAcceptance } from '@/lib/acceptance';
import { TIME_BASE_SECONDS } from '@/lib/exports/discrete';
import type { AccuracyFiguresRecord, ReductionCurves, ReducedMatricesRecord } from '@/lib/engine-tasks/records';
import { latestJobFor, type JobView } from '@/lib/jobs/jobs';
import { analysisOf, versionPath } from '@/lib/source-models';
import type { RecipeRow, ReducedVersionRow } from '@/lib/reduced-models/rows';
import { SLUG_PATTERN } from '@/lib/slug';
import { reportAcceptance, reportFigure, versionLineage, type LineageRow } from '@/lib/version-lineage';

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
  if (!projectSlug || !SLUG_PATTERN.test(projectSlug) || projectSlug.length > 60) return null;
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

// ---------------------------------------------------------------------------------------------------
// Reads

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

/** A reduced model in the list, by its newest version. */
export interface ReducedModelListRow {
  id: string;
  name: string;
  slug: string;
  sourceModel: { name: string; slug: string };
  latest: ReducedVersionSummary;
}

/** The figures lists show beside a version: method, author and the accuracy report's figures. */
interface ListedColumns {
  method: string;
  authorName: string;
  hInfinityErrorRelative: number | null;
  errorBound: number | null;
  acceptancePassed: boolean | null;
  acceptanceRecord: Record<string, unknown> | null;
  matricesSha256: string;
}

function listedVersions(knex: Knex) {
  return versionLineage<ListedColumns>(knex, {
    method: 'r.method',
    authorName: 'au.name',
    hInfinityErrorRelative: reportFigure(knex, 'hInfinityErrorRelative'),
    errorBound: reportFigure(knex, 'errorBound'),
    acceptancePassed: 'ar.acceptance_passed',
    acceptanceRecord: reportAcceptance(knex),
    matricesSha256: 'rv.matrices_sha256',
  }, ['recipe', 'author', 'report']);
}

function toVersionSummary(v: LineageRow & ListedColumns): ReducedVersionSummary {
  return {
    id: v.versionId,
    number: v.versionNumber,
    status: v.status,
    order: v.order,
    method: v.method,
    sourceVersionNumber: v.sourceVersionNumber,
    matricesSha256: v.matricesSha256,
    hInfinityErrorRelative: v.hInfinityErrorRelative,
    errorBound: v.errorBound,
    acceptancePassed: v.acceptancePassed,
    acceptance: storedAcceptance(v.acceptanceRecord ? { acceptance: v.acceptanceRecord } : null, v.acceptancePassed),
    author: v.authorName,
    createdAt: v.createdAt.toISOString(),
  };
}

export async function listReducedModels(): Promise<ReducedModelListRow[]> {
  const knex = db();
  // Each reduced model by its newest version.
  const rows = await listedVersions(knex)
    .whereNotExists(knex('reduced_versions as newer').whereRaw('newer.reduced_model_id = rv.reduced_model_id').andWhereRaw('newer.number > rv.number'))
    .orderBy('rv.created_at', 'desc');
  return rows.map((r) => ({
    id: r.reducedModelId,
    name: r.reducedModelName,
    slug: r.reducedModelSlug,
    sourceModel: { name: r.sourceModelName, slug: r.sourceModelSlug },
    latest: toVersionSummary(r),
  }));
}

export interface ReducedModelView {
  id: string;
  name: string;
  slug: string;
  description: string;
  sourceModel: { id: string; name: string; slug: string };
}

export async function getReducedModel(slug: string): Promise<{ model: ReducedModelView; versions: ReducedVersionSummary[] } | null> {
  const row = await db()('reduced_models as rm')
    .join('source_models as sm', 'sm.id', 'rm.source_model_id')
    .where('rm.slug', slug)
    .first('rm.*', 'sm.name as source_name', 'sm.slug as source_slug');
  if (!row) return null;
  const versions = await listedVersions(db()).where('rv.reduced_model_id', row.id).orderBy('rv.number', 'desc');
  return {
    model: {
      id: row.id,
      name: row.name,
      slug: row.slug,
      description: row.description,
      sourceModel: { id: row.source_model_id, name: row.source_name, slug: row.source_slug },
    },
    versions: versions.map(toVersionSummary),
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
  const row = await versionLineage<{
    engineVersion: string;
    inputChecksum: string;
    matrices: ReducedMatricesRecord;
    recipeId: string;
    sourceChecksum: string;
    timeBase: string;
    figures: AccuracyFiguresRecord;
    curves: ReductionCurves;
  }>(db(), {
    engineVersion: 'rv.engine_version',
    inputChecksum: 'rv.input_checksum',
    matrices: 'rv.matrices',
    recipeId: 'rv.recipe_id',
    sourceChecksum: 'sv.checksum',
    timeBase: 'sm.time_base',
    figures: 'ar.figures',
    curves: 'ar.curves',
  }, ['report'])
    .whereNotNull('ar.id')
    .where('rv.id', summary.id)
    .first();
  if (!row) return null;
  const [recipe, analysis, responseJob] = await Promise.all([
    db()<RecipeRow>('recipes').where({ id: row.recipeId }).first(),
    analysisOf(row.sourceVersionId),
    latestJobFor('response', 'reduced_version', row.versionId),
  ]);
  return {
    model: found.model,
    version: { ...summary, engineVersion: row.engineVersion, inputChecksum: row.inputChecksum, matrices: row.matrices },
    recipe: recipe!,
    source: {
      modelName: row.sourceModelName,
      modelSlug: row.sourceModelSlug,
      versionNumber: row.sourceVersionNumber,
      versionId: row.sourceVersionId,
      checksum: row.sourceChecksum,
      timeBase: row.timeBase,
      inputLabels: analysis?.labels?.inputs ?? null,
      outputLabels: analysis?.labels?.outputs ?? null,
      url: versionPath(row.sourceModelSlug, row.sourceVersionNumber),
    },
    figures: row.figures,
    curves: row.curves,
    responseJob,
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
