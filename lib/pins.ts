// Pins: a controller project's dependency on a reduced model (README.md, "Pull API"), and how a pin resolves to a
// version now.
//
//   exact            always that version, even once it is retired: a controller can re-download exactly what
//                    it was built with. A retired version is flagged, never silently swapped.
//   newest approved  the highest-numbered approved version (a retired one never) that meets every limit the
//                    pin sets: maximum order, maximum relative H-infinity error (the accuracy report's
//                    hInfinityErrorRelative, ||G - Gr||inf / ||G||inf), and "acceptance band passed".
//
// Either way the resolved version is flagged "upstream changed" when its source model has a version with a
// greater number than the source version it was reduced from.
import type { Knex } from 'knex';
import { z } from 'zod';
import { db } from '@/lib/db';
import { preparedRows } from '@/lib/prepared';
import { recordAudit } from '@/lib/audit';
import { storedAcceptance, type StoredAcceptance } from '@/lib/acceptance';
import { ApiError, notFound } from '@/lib/http';
import { requireProject, requireProjectManager, SLUG_PATTERN } from '@/lib/projects';
import type { SessionUser } from '@/lib/auth';

export const PIN_MODES = ['exact', 'newest_approved'] as const;
export type PinMode = (typeof PIN_MODES)[number];

export interface PinLimits {
  maxOrder: number | null;
  /** Ratio, not per cent: 0.01 admits versions whose ||G - Gr||inf / ||G||inf is at most 1 %. */
  maxRelativeHInfinityError: number | null;
  requireAcceptancePassed: boolean;
}

export interface PinRow {
  id: string;
  project_id: string;
  reduced_model_id: string;
  mode: PinMode;
  reduced_version_id: string | null;
  max_order: number | null;
  max_relative_h_infinity_error: number | null;
  require_acceptance_passed: boolean;
  notice_state: NoticeState | null;
  created_by: string;
  created_at: Date;
  updated_at: Date;
}

/** What members were last told about a pin (lib/project-notices.ts). */
export interface NoticeState {
  resolvedVersionId: string | null;
  retired: boolean;
  upstreamChanged: boolean;
  /** Highest approved version number seen that satisfies the pin. */
  newestSatisfyingNumber: number | null;
}

/** The facts about one approved or retired version that resolution and the lock file need. */
export interface VersionFacts {
  id: string;
  reducedModelId: string;
  number: number;
  status: 'approved' | 'retired';
  order: number;
  matricesSha256: string;
  sourceModelId: string;
  sourceModelSlug: string;
  sourceVersionId: string;
  sourceVersionNumber: number;
  newestSourceVersionNumber: number;
  hInfinityErrorRelative: number | null;
  acceptancePassed: boolean | null;
  /** the stored acceptance verdict (lib/acceptance.ts); null when the recipe set no band */
  acceptance: StoredAcceptance | null;
}

export interface PinSpec {
  mode: PinMode;
  exactVersionId: string | null;
  limits: PinLimits;
}

export interface PinResolution {
  /** The version the pin resolves to now; null when no approved version meets a newest-approved pin. */
  version: VersionFacts | null;
  retired: boolean;
  upstreamChanged: boolean;
  /** The newest approved version of the model, limits aside (to say why a newer one was passed over). */
  newestApproved: VersionFacts | null;
  /** Approved versions newer than the resolved one that satisfy the pin (exact pins: any newer approved). */
  newerSatisfying: VersionFacts[];
  /** One sentence for people: what the pin resolves to, and why. */
  explanation: string;
}

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

const positiveInt = (what: string) =>
  z.number({ error: `${what} must be a whole number.` }).int(`${what} must be a whole number.`).min(1, `${what} must be at least 1.`);

const pinFields = z.object({
  reducedModel: z
    .string({ error: 'Choose a reduced model.' })
    .regex(SLUG_PATTERN, 'The reduced model must be given by its slug.'),
  mode: z.enum(PIN_MODES, { error: 'Mode must be "exact" or "newest_approved".' }),
  version: positiveInt('Version').optional(),
  maxOrder: positiveInt('Maximum order').nullable().optional(),
  maxRelativeHInfinityError: z
    .number({ error: 'Maximum relative H-infinity error must be a number (a ratio, e.g. 0.01 for 1 %).' })
    .refine((v) => Number.isFinite(v) && v > 0, 'Maximum relative H-infinity error must be a positive ratio, e.g. 0.01 for 1 %.')
    .nullable()
    .optional(),
  requireAcceptancePassed: z.boolean({ error: 'Acceptance band passed must be true or false.' }).optional(),
});

type PinShape = Omit<z.infer<typeof pinFields>, 'reducedModel'>;

function checkPinShape(pin: PinShape, ctx: z.RefinementCtx): void {
  if (pin.mode === 'exact') {
    if (pin.version === undefined) ctx.addIssue({ code: 'custom', path: ['version'], message: 'An exact pin needs the version number to pin.' });
    for (const field of ['maxOrder', 'maxRelativeHInfinityError', 'requireAcceptancePassed'] as const) {
      if (pin[field] !== undefined && pin[field] !== null && pin[field] !== false) {
        ctx.addIssue({ code: 'custom', path: [field], message: 'Limits apply to "newest approved" pins only; an exact pin names its version.' });
      }
    }
  } else if (pin.version !== undefined) {
    ctx.addIssue({ code: 'custom', path: ['version'], message: 'A "newest approved" pin names no version; give limits instead, or pin exactly.' });
  }
}

/** A new pin: the reduced model (slug) and how to resolve it. */
export const pinInputSchema = pinFields.superRefine(checkPinShape);
/** A changed pin: the same, without the model (a pin keeps its model; pin another one instead). */
export const pinUpdateSchema = pinFields.omit({ reducedModel: true }).superRefine(checkPinShape);

export type PinUpdate = z.infer<typeof pinUpdateSchema>;
export type PinInput = z.infer<typeof pinInputSchema>;

export function limitsOf(row: Pick<PinRow, 'max_order' | 'max_relative_h_infinity_error' | 'require_acceptance_passed'>): PinLimits {
  return {
    maxOrder: row.max_order,
    maxRelativeHInfinityError: row.max_relative_h_infinity_error,
    requireAcceptancePassed: row.require_acceptance_passed,
  };
}

export function specOf(row: PinRow): PinSpec {
  return { mode: row.mode, exactVersionId: row.reduced_version_id, limits: limitsOf(row) };
}

/** Why a version does not meet a pin's limits: one phrase per limit it breaks (empty when it meets them). */
export function limitFailures(limits: PinLimits, v: VersionFacts): string[] {
  const failures: string[] = [];
  if (limits.maxOrder !== null && v.order > limits.maxOrder) failures.push(`order ${v.order} > ${limits.maxOrder}`);
  if (limits.maxRelativeHInfinityError !== null) {
    if (v.hInfinityErrorRelative === null) failures.push('no relative H-infinity error in its accuracy report');
    else if (v.hInfinityErrorRelative > limits.maxRelativeHInfinityError) {
      failures.push(`relative H-infinity error ${v.hInfinityErrorRelative.toPrecision(3)} > ${limits.maxRelativeHInfinityError}`);
    }
  }
  if (limits.requireAcceptancePassed && v.acceptancePassed !== true) {
    failures.push(v.acceptancePassed === false ? 'acceptance band failed' : 'no acceptance band checked');
  }
  return failures;
}

function upstreamChanged(v: VersionFacts): boolean {
  return v.newestSourceVersionNumber > v.sourceVersionNumber;
}

/**
 * Resolves a pin against the approved and retired versions of its reduced model. Pure: the caller loads the
 * facts (loadVersionFacts), so resolution can be checked without a database.
 */
export function resolvePin(spec: PinSpec, versions: readonly VersionFacts[]): PinResolution {
  const approved = versions.filter((v) => v.status === 'approved').sort((a, b) => b.number - a.number);
  const newestApproved = approved[0] ?? null;
  const satisfying = spec.mode === 'exact' ? approved : approved.filter((v) => limitFailures(spec.limits, v).length === 0);

  let version: VersionFacts | null;
  let explanation: string;
  if (spec.mode === 'exact') {
    version = versions.find((v) => v.id === spec.exactVersionId) ?? null;
    explanation = version
      ? `Pinned exactly to v${version.number}${version.status === 'retired' ? ', which has been retired' : ''}.`
      : 'The pinned version is no longer on the shelf.';
  } else {
    version = satisfying[0] ?? null;
    if (!version) {
      explanation = newestApproved
        ? `No approved version meets the limits (newest approved v${newestApproved.number}: ${limitFailures(spec.limits, newestApproved).join(', ')}).`
        : 'The reduced model has no approved version yet.';
    } else if (newestApproved && newestApproved.number > version.number) {
      explanation = `v${version.number} is the newest approved version within the limits; v${newestApproved.number} is not (${limitFailures(spec.limits, newestApproved).join(', ')}).`;
    } else {
      explanation = `v${version.number} is the newest approved version${hasLimits(spec.limits) ? ' and meets the limits' : ''}.`;
    }
  }
  const newerSatisfying = version ? satisfying.filter((v) => v.number > version.number) : [];
  return {
    version,
    retired: version?.status === 'retired',
    upstreamChanged: version ? upstreamChanged(version) : false,
    newestApproved,
    newerSatisfying,
    explanation,
  };
}

export function hasLimits(limits: PinLimits): boolean {
  return limits.maxOrder !== null || limits.maxRelativeHInfinityError !== null || limits.requireAcceptancePassed;
}

interface FactsRow {
  id: string;
  reduced_model_id: string;
  number: number;
  status: 'approved' | 'retired';
  order: number;
  matrices_sha256: string;
  source_model_id: string;
  source_slug: string;
  source_version_id: string;
  source_number: number;
  newest_source_number: number;
  h_infinity_error_relative: number | null;
  acceptance_passed: boolean | null;
  acceptance_record: Record<string, unknown> | null;
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
  const query = trx('reduced_versions as rv')
    .join('source_versions as sv', 'sv.id', 'rv.source_version_id')
    .join('source_models as sm', 'sm.id', 'sv.source_model_id')
    .leftJoin('accuracy_reports as ar', 'ar.reduced_version_id', 'rv.id')
    .whereIn('rv.reduced_model_id', Array.isArray(reducedModels) ? [...new Set(reducedModels as readonly string[])] : (reducedModels as Knex.QueryBuilder))
    .whereIn('rv.status', ['approved', 'retired'])
    .select(
      'rv.id',
      'rv.reduced_model_id',
      'rv.number',
      'rv.status',
      'rv.order',
      'rv.matrices_sha256',
      'sv.source_model_id',
      'sm.slug as source_slug',
      'rv.source_version_id',
      'sv.number as source_number',
      trx.raw('(SELECT max(s2.number) FROM source_versions s2 WHERE s2.source_model_id = sv.source_model_id) AS newest_source_number'),
      // A report that states no finite figure counts as "no figure", never as zero error.
      trx.raw(`CASE WHEN jsonb_typeof(ar.figures->'hInfinityErrorRelative') = 'number'
                    THEN (ar.figures->>'hInfinityErrorRelative')::float8 END AS h_infinity_error_relative`),
      'ar.acceptance_passed',
      trx.raw(`ar.figures->'acceptance' AS acceptance_record`),
    );
  const rows = await preparedRows<FactsRow>(query, trx);
  for (const r of rows) {
    const facts: VersionFacts = {
      id: r.id,
      reducedModelId: r.reduced_model_id,
      number: r.number,
      status: r.status,
      order: r.order,
      matricesSha256: r.matrices_sha256,
      sourceModelId: r.source_model_id,
      sourceModelSlug: r.source_slug,
      sourceVersionId: r.source_version_id,
      sourceVersionNumber: r.source_number,
      newestSourceVersionNumber: Number(r.newest_source_number),
      hInfinityErrorRelative: r.h_infinity_error_relative,
      acceptancePassed: r.acceptance_passed,
      acceptance: storedAcceptance(r.acceptance_record ? { acceptance: r.acceptance_record } : null, r.acceptance_passed),
    };
    const list = byModel.get(r.reduced_model_id) ?? [];
    list.push(facts);
    byModel.set(r.reduced_model_id, list);
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

export function noticeStateOf(resolution: PinResolution): NoticeState {
  const numbers = [resolution.version, ...resolution.newerSatisfying].flatMap((v) => (v && v.status === 'approved' ? [v.number] : []));
  return {
    resolvedVersionId: resolution.version?.id ?? null,
    retired: resolution.retired,
    upstreamChanged: resolution.upstreamChanged,
    newestSatisfyingNumber: numbers.length > 0 ? Math.max(...numbers) : null,
  };
}

async function exactVersionId(trx: Knex.Transaction, model: { id: string; slug: string }, spec: PinShape): Promise<string | null> {
  if (spec.mode !== 'exact') return null;
  const version = await trx('reduced_versions').where({ reduced_model_id: model.id, number: spec.version }).first('id', 'status');
  if (!version) throw new ApiError(404, 'not_found', `Reduced model "${model.slug}" has no version v${spec.version}.`, 'version');
  if (version.status !== 'approved') {
    throw new ApiError(409, 'not_approved', `v${spec.version} of "${model.slug}" is ${String(version.status).replace('_', ' ')}; pin an approved version.`, 'version');
  }
  return version.id;
}

function pinColumns(spec: PinShape, versionId: string | null) {
  const exact = spec.mode === 'exact';
  return {
    mode: spec.mode,
    reduced_version_id: versionId,
    max_order: exact ? null : (spec.maxOrder ?? null),
    max_relative_h_infinity_error: exact ? null : (spec.maxRelativeHInfinityError ?? null),
    require_acceptance_passed: exact ? false : (spec.requireAcceptancePassed ?? false),
  };
}

export async function createPin(projectSlug: string, input: PinInput, actor: SessionUser, outer: Knex = db()): Promise<ResolvedPin> {
  return outer.transaction(async (trx) => {
    const project = await requireProject(projectSlug, trx);
    await requireProjectManager(project, actor, trx);
    const model = await trx('reduced_models').where({ slug: input.reducedModel }).first('id', 'slug');
    if (!model) throw new ApiError(404, 'not_found', `Reduced model "${input.reducedModel}" was not found.`, 'reducedModel');
    const versionId = await exactVersionId(trx, model, input);
    const existing = await trx('pins').where({ project_id: project.id, reduced_model_id: model.id }).first('id');
    if (existing) throw new ApiError(409, 'already_pinned', `This project already pins "${model.slug}"; change that pin instead.`, 'reducedModel');
    const [row] = await trx('pins')
      .insert({ project_id: project.id, reduced_model_id: model.id, ...pinColumns(input, versionId), created_by: actor.id })
      .returning('id');
    const pin = (await findPinById(project.id, row.id, trx))!;
    // Members hear about changes from now on, not about the state the pin was created in.
    await trx('pins').where({ id: pin.id }).update({ notice_state: JSON.stringify(noticeStateOf(pin.resolution)) });
    await recordAudit(trx, {
      actorId: actor.id,
      action: 'pin.created',
      subjectType: 'controller_project',
      subjectId: project.id,
      details: { pinId: pin.id, reducedModel: model.slug, mode: input.mode, version: input.version ?? null, limits: pin.limits },
    });
    return pin;
  });
}

export async function updatePin(projectSlug: string, pinId: string, change: PinUpdate, actor: SessionUser, outer: Knex = db()): Promise<ResolvedPin> {
  return outer.transaction(async (trx) => {
    const project = await requireProject(projectSlug, trx);
    await requireProjectManager(project, actor, trx);
    const before = await trx('pins').where({ id: pinId, project_id: project.id }).forUpdate().first();
    if (!before) throw notFound('That pin');
    const model = await trx('reduced_models').where({ id: before.reduced_model_id }).first('id', 'slug');
    const versionId = await exactVersionId(trx, model, change);
    await trx('pins').where({ id: pinId }).update({ ...pinColumns(change, versionId), updated_at: trx.fn.now() });
    const pin = (await findPinById(project.id, pinId, trx))!;
    await trx('pins').where({ id: pinId }).update({ notice_state: JSON.stringify(noticeStateOf(pin.resolution)) });
    await recordAudit(trx, {
      actorId: actor.id,
      action: 'pin.changed',
      subjectType: 'controller_project',
      subjectId: project.id,
      details: { pinId, reducedModel: model.slug, mode: change.mode, version: change.version ?? null, limits: pin.limits },
    });
    return pin;
  });
}

export async function deletePin(projectSlug: string, pinId: string, actor: SessionUser, outer: Knex = db()): Promise<void> {
  await outer.transaction(async (trx) => {
    const project = await requireProject(projectSlug, trx);
    await requireProjectManager(project, actor, trx);
    const pin = await findPinById(project.id, pinId, trx);
    if (!pin) throw notFound('That pin');
    await trx('pins').where({ id: pinId }).delete();
    await recordAudit(trx, {
      actorId: actor.id,
      action: 'pin.removed',
      subjectType: 'controller_project',
      subjectId: project.id,
      details: { pinId, reducedModel: pin.reducedModel.slug },
    });
  });
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
