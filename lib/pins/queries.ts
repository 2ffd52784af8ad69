// The reads of pins: the approved and retired versions of pinned reduced models (the facts a pin resolves
// against), a project's pins resolved, the candidates a new pin may point at, and the pins of one reduced
// model (the end of the lineage chain).
import type { Knex } from 'knex';
import { db } from '@/lib/db';
import { preparedRows } from '@/lib/prepared';
import { storedAcceptance } from '@/lib/acceptance';
import { newestSourceNumber, reportAcceptance, reportFigure, versionLineage } from '@/lib/version-lineage';
import type { PinMode } from '@/lib/pins/schemas';
import { limitsOf, resolvePin, specOf, type PinLimits, type PinResolution, type PinRow, type VersionFacts } from '@/lib/pins/resolution';

export interface ResolvedPin {
  id: string;
  projectId: string;
  reducedModel: { id: string; slug: string; name: string };
  mode: PinMode;
  exactVersionNumber: number | null;
  limits: PinLimits;
  resolution: PinResolution;
  createdAt: string;
}

interface FactsColumns {
  matricesSha256: string;
  newestSourceNumber: number;
  hInfinityErrorRelative: number | null;
  acceptancePassed: boolean | null;
  acceptanceRecord: Record<string, unknown> | null;
}

/**
 * Approved and retired versions of the given reduced models, grouped by model id. The models are given by
 * id, or as a subquery selecting reduced_model_id, so the facts can be read side by side with the pins
 * that name them (one round trip less on the pull API's path).
 */
export async function loadVersionFacts(
  reducedModels: readonly string[] | Knex.QueryBuilder,
  trx: Knex | Knex.Transaction = db(),
): Promise<Map<string, VersionFacts[]>> {
  const byModel = new Map<string, VersionFacts[]>();
  if (Array.isArray(reducedModels) && reducedModels.length === 0) return byModel;
  const query = versionLineage<FactsColumns>(trx, {
    matricesSha256: 'rv.matrices_sha256',
    newestSourceNumber: newestSourceNumber(trx),
    // A report that states no finite figure counts as "no figure", never as zero error.
    hInfinityErrorRelative: reportFigure(trx, 'hInfinityErrorRelative'),
    acceptancePassed: 'ar.acceptance_passed',
    acceptanceRecord: reportAcceptance(trx),
  }, ['report'])
    .whereIn('rv.reduced_model_id', Array.isArray(reducedModels) ? [...new Set(reducedModels as readonly string[])] : (reducedModels as Knex.QueryBuilder))
    .whereIn('rv.status', ['approved', 'retired']);
  const rows = await preparedRows<Awaited<typeof query>[number]>(query, trx);
  for (const r of rows) {
    const facts: VersionFacts = {
      id: r.versionId,
      reducedModelId: r.reducedModelId,
      number: r.versionNumber,
      status: r.status as VersionFacts['status'],
      order: r.order,
      matricesSha256: r.matricesSha256,
      sourceModelId: r.sourceModelId,
      sourceModelSlug: r.sourceModelSlug,
      sourceVersionId: r.sourceVersionId,
      sourceVersionNumber: r.sourceVersionNumber,
      newestSourceVersionNumber: Number(r.newestSourceNumber),
      hInfinityErrorRelative: r.hInfinityErrorRelative,
      acceptancePassed: r.acceptancePassed,
      acceptance: storedAcceptance(r.acceptanceRecord ? { acceptance: r.acceptanceRecord } : null, r.acceptancePassed),
    };
    const list = byModel.get(r.reducedModelId) ?? [];
    list.push(facts);
    byModel.set(r.reducedModelId, list);
  }
  return byModel;
}

interface PinJoinRow extends PinRow {
  model_slug: string;
  model_name: string;
  exact_number: number | null;
}

function pinsQuery(trx: Knex | Knex.Transaction) {
  return trx('pins as p')
    .join('reduced_models as rm', 'rm.id', 'p.reduced_model_id')
    .leftJoin('reduced_versions as xv', 'xv.id', 'p.reduced_version_id')
    .select('p.*', 'rm.slug as model_slug', 'rm.name as model_name', 'xv.number as exact_number');
}

function resolveRows(rows: PinJoinRow[], facts: Map<string, VersionFacts[]>): ResolvedPin[] {
  return rows.map((r) => ({
    id: r.id,
    projectId: r.project_id,
    reducedModel: { id: r.reduced_model_id, slug: r.model_slug, name: r.model_name },
    mode: r.mode,
    exactVersionNumber: r.exact_number,
    limits: limitsOf(r),
    resolution: resolvePin(specOf(r), facts.get(r.reduced_model_id) ?? []),
    createdAt: r.created_at.toISOString(),
  }));
}

/** The pins a query selects, resolved; the version facts are read alongside, by the same filter. */
async function resolvedPins(
  trx: Knex | Knex.Transaction,
  filter: (q: Knex.QueryBuilder) => Knex.QueryBuilder,
  order?: string,
): Promise<ResolvedPin[]> {
  const rowsQuery = filter(pinsQuery(trx));
  const modelIds = filter(trx('pins as p').join('reduced_models as rm', 'rm.id', 'p.reduced_model_id').select('p.reduced_model_id'));
  const [rows, facts] = await Promise.all([
    preparedRows<PinJoinRow>(order ? rowsQuery.orderBy(order) : rowsQuery, trx),
    loadVersionFacts(modelIds, trx),
  ]);
  return resolveRows(rows, facts);
}

export async function listProjectPins(projectId: string, trx: Knex | Knex.Transaction = db()): Promise<ResolvedPin[]> {
  return resolvedPins(trx, (q) => q.where('p.project_id', projectId), 'rm.slug');
}

/** The project's pin of the reduced model with that slug, or undefined (a model pinned elsewhere is not told apart). */
export async function findPinByModelSlug(projectId: string, modelSlug: string, trx: Knex | Knex.Transaction = db()): Promise<ResolvedPin | undefined> {
  return (await resolvedPins(trx, (q) => q.where('p.project_id', projectId).andWhere('rm.slug', modelSlug)))[0];
}

export async function findPinById(projectId: string, pinId: string, trx: Knex | Knex.Transaction = db()): Promise<ResolvedPin | undefined> {
  return (await resolvedPins(trx, (q) => q.where('p.project_id', projectId).andWhere('p.id', pinId)))[0];
}

/**
 * A version of the pinned model by number, if it is approved or retired (drafts and versions in review are
 * not for controllers). Undefined otherwise, the same answer as for a number that does not exist.
 */
export async function pinnedModelVersion(pin: ResolvedPin, number: number, trx: Knex | Knex.Transaction = db()): Promise<VersionFacts | undefined> {
  const facts = await loadVersionFacts([pin.reducedModel.id], trx);
  return (facts.get(pin.reducedModel.id) ?? []).find((v) => v.number === number);
}

export interface PinCandidate {
  slug: string;
  name: string;
  approvedVersions: { number: number; order: number; hInfinityErrorRelative: number | null; acceptancePassed: boolean | null }[];
}

/** Reduced models with at least one approved version: what a pin may point at. */
export async function pinCandidates(trx: Knex | Knex.Transaction = db()): Promise<PinCandidate[]> {
  const models = await trx('reduced_models as rm')
    .whereExists(trx('reduced_versions as rv').whereRaw('rv.reduced_model_id = rm.id').andWhere('rv.status', 'approved'))
    .select('rm.id', 'rm.slug', 'rm.name')
    .orderBy('rm.slug');
  const facts = await loadVersionFacts(models.map((m) => m.id), trx);
  return models.map((m) => ({
    slug: m.slug,
    name: m.name,
    approvedVersions: (facts.get(m.id) ?? [])
      .filter((v) => v.status === 'approved')
      .sort((a, b) => b.number - a.number)
      .map((v) => ({ number: v.number, order: v.order, hInfinityErrorRelative: v.hInfinityErrorRelative, acceptancePassed: v.acceptancePassed })),
  }));
}

export interface ProjectPinOfModel {
  project: { id: string; slug: string; name: string };
  pinId: string;
  mode: PinMode;
  exactVersionNumber: number | null;
  resolvedVersionNumber: number | null;
  retired: boolean;
  upstreamChanged: boolean;
}

/**
 * Every controller project that pins the reduced model, and what each pin resolves to: the end of the
 * lineage chain (source model → reduced model → controller projects).
 */
export async function pinsForReducedModel(reducedModelId: string, trx: Knex | Knex.Transaction = db()): Promise<ProjectPinOfModel[]> {
  const rows = await pinsQuery(trx)
    .join('controller_projects as cp', 'cp.id', 'p.project_id')
    .select('cp.slug as project_slug', 'cp.name as project_name')
    .where('p.reduced_model_id', reducedModelId)
    .orderBy('cp.slug');
  const resolved = resolveRows(rows, await loadVersionFacts([reducedModelId], trx));
  return resolved.map((pin, i) => ({
    project: { id: pin.projectId, slug: rows[i].project_slug, name: rows[i].project_name },
    pinId: pin.id,
    mode: pin.mode,
    exactVersionNumber: pin.exactVersionNumber,
    resolvedVersionNumber: pin.resolution.version?.number ?? null,
    retired: pin.resolution.retired,
    upstreamChanged: pin.resolution.upstreamChanged,
  }));
}

/** Per project, how many of its pins need a look: retired, upstream changed, or resolving to nothing. */
export async function pinsNeedingAttention(trx: Knex | Knex.Transaction = db()): Promise<Map<string, number>> {
  const pins = await resolvedPins(trx, (q) => q);
  const counts = new Map<string, number>();
  for (const pin of pins) {
    const r = pin.resolution;
    if (r.retired || r.upstreamChanged || r.version === null) counts.set(pin.projectId, (counts.get(pin.projectId) ?? 0) + 1);
  }
  return counts;
}
