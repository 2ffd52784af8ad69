// The reads of review: a version's summary (lineage, recipe, approval, retirement, accuracy report), its
// review history, the review sheet as one person sees it, the review queue and the latest decisions.
import type { Knex } from 'knex';
import { db } from '@/lib/db';
import { storedAcceptance, type AcceptanceStatus, type StoredAcceptance } from '@/lib/acceptance';
import type { Role } from '@/lib/roles';
import { availableActions, withheldReason, type ReviewAction, type VersionStatus } from '@/lib/review/state-machine';
import { COMMENT_ROLES, NEXT_DRAFT_ROLES, type Actor } from '@/lib/review/schemas';
import { reducedVersionPath } from '@/lib/reduced-models/paths';
import { versionLineage, type LineageRow } from '@/lib/version-lineage';

interface PersonRef {
  id: string;
  name: string;
}

export interface VersionSummary {
  id: string;
  number: number;
  status: VersionStatus;
  reducedModel: { id: string; name: string; slug: string };
  author: PersonRef;
  createdAt: string;
  submittedAt: string | null;
  order: number;
  statesKeptUnstable: number;
  matricesSha256: string;
  inputChecksum: string;
  engineVersion: string;
  source: { modelId: string; modelName: string; modelSlug: string; versionId: string; number: number; checksum: string; timeBase: string };
  newestSourceNumber: number;
  newestSourceVersionId: string;
  /** A newer version of the source model exists than the one this was reduced from. */
  upstreamChanged: boolean;
  recipe: { id: string; method: string; order: number | null; tolerance: number | null; options: Record<string, unknown> };
  predecessor: { id: string; number: number; sourceNumber: number } | null;
  approval: { by: PersonRef; at: string; figures: ApprovalSnapshot } | null;
  retirement: { by: PersonRef; at: string; reason: string } | null;
  accuracy: { figures: Record<string, unknown>; acceptancePassed: boolean | null } | null;
  /** the report's stored acceptance verdict (lib/acceptance.ts); null when the recipe set no band */
  acceptance: StoredAcceptance | null;
}

/** What the approver saw: the accuracy report's figures and the matrices' digest at that moment. */
export interface ApprovalSnapshot {
  figures: Record<string, unknown>;
  acceptancePassed: boolean | null;
  matricesSha256: string;
  reportCreatedAt: string | null;
}

export const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null);

/** The columns of a summary beyond the lineage's own. */
interface SummaryColumns {
  submittedAt: Date | null;
  statesKeptUnstable: number;
  matricesSha256: string;
  inputChecksum: string;
  engineVersion: string;
  approvedAt: Date | null;
  approvedFigures: ApprovalSnapshot;
  retiredAt: Date | null;
  retiredReason: string;
  authorName: string;
  sourceChecksum: string;
  sourceTimeBase: string | null;
  newestSourceNumber: number;
  newestSourceVersionId: string;
  upstreamChanged: boolean;
  recipeId: string;
  recipeMethod: string;
  recipeOrder: number | null;
  recipeTolerance: number | null;
  recipeOptions: Record<string, unknown> | null;
  predecessorId: string | null;
  predecessorNumber: number;
  predecessorSourceNumber: number;
  approverId: string;
  approverName: string;
  retirerId: string;
  retirerName: string;
  reportFigures: Record<string, unknown> | null;
  reportAcceptancePassed: boolean | null;
}

function summaryQuery(trx: Knex | Knex.Transaction) {
  return versionLineage<SummaryColumns>(trx, {
    submittedAt: 'rv.submitted_at',
    statesKeptUnstable: 'rv.states_kept_unstable',
    matricesSha256: 'rv.matrices_sha256',
    inputChecksum: 'rv.input_checksum',
    engineVersion: 'rv.engine_version',
    approvedAt: 'rv.approved_at',
    approvedFigures: 'rv.approved_figures',
    retiredAt: 'rv.retired_at',
    retiredReason: 'rv.retired_reason',
    authorName: 'au.name',
    sourceChecksum: 'sv.checksum',
    sourceTimeBase: 'sm.time_base',
    newestSourceNumber: 'up.newest_source_number',
    newestSourceVersionId: 'up.newest_source_version_id',
    upstreamChanged: 'up.upstream_changed',
    recipeId: 'r.id',
    recipeMethod: 'r.method',
    recipeOrder: 'r.order',
    recipeTolerance: 'r.tolerance',
    recipeOptions: 'r.options',
    predecessorId: 'pv.id',
    predecessorNumber: 'pv.number',
    predecessorSourceNumber: 'psv.number',
    approverId: 'apu.id',
    approverName: 'apu.name',
    retirerId: 'reu.id',
    retirerName: 'reu.name',
    reportFigures: 'ar.figures',
    reportAcceptancePassed: 'ar.acceptance_passed',
  }, ['author', 'recipe', 'upstream', 'report'])
    .leftJoin('reduced_versions as pv', 'pv.id', 'rv.predecessor_id')
    .leftJoin('source_versions as psv', 'psv.id', 'pv.source_version_id')
    .leftJoin('users as apu', 'apu.id', 'rv.approved_by')
    .leftJoin('users as reu', 'reu.id', 'rv.retired_by');
}

function toSummary(r: LineageRow & SummaryColumns): VersionSummary {
  return {
    id: r.versionId,
    number: r.versionNumber,
    status: r.status,
    reducedModel: { id: r.reducedModelId, name: r.reducedModelName, slug: r.reducedModelSlug },
    author: { id: r.authorId, name: r.authorName },
    createdAt: r.createdAt.toISOString(),
    submittedAt: iso(r.submittedAt),
    order: r.order,
    statesKeptUnstable: r.statesKeptUnstable,
    matricesSha256: r.matricesSha256,
    inputChecksum: r.inputChecksum,
    engineVersion: r.engineVersion,
    source: {
      modelId: r.sourceModelId,
      modelName: r.sourceModelName,
      modelSlug: r.sourceModelSlug,
      versionId: r.sourceVersionId,
      number: r.sourceVersionNumber,
      checksum: r.sourceChecksum,
      timeBase: r.sourceTimeBase || 's',
    },
    newestSourceNumber: r.newestSourceNumber,
    newestSourceVersionId: r.newestSourceVersionId,
    upstreamChanged: r.upstreamChanged,
    recipe: {
      id: r.recipeId,
      method: r.recipeMethod,
      order: r.recipeOrder,
      tolerance: r.recipeTolerance,
      options: r.recipeOptions ?? {},
    },
    predecessor: r.predecessorId ? { id: r.predecessorId, number: r.predecessorNumber, sourceNumber: r.predecessorSourceNumber } : null,
    approval: r.approvedAt ? { by: { id: r.approverId, name: r.approverName }, at: r.approvedAt.toISOString(), figures: r.approvedFigures } : null,
    retirement: r.retiredAt ? { by: { id: r.retirerId, name: r.retirerName }, at: r.retiredAt.toISOString(), reason: r.retiredReason } : null,
    accuracy: r.reportFigures ? { figures: r.reportFigures, acceptancePassed: r.reportAcceptancePassed } : null,
    acceptance: r.reportFigures ? storedAcceptance(r.reportFigures, r.reportAcceptancePassed) : null,
  };
}

export async function versionSummary(id: string, trx: Knex | Knex.Transaction = db()): Promise<VersionSummary | null> {
  const row = await summaryQuery(trx).where('rv.id', id).first();
  return row ? toSummary(row) : null;
}

export async function versionSummaries(ids: readonly string[], trx: Knex | Knex.Transaction = db()): Promise<VersionSummary[]> {
  if (ids.length === 0) return [];
  const rows = await summaryQuery(trx).whereIn('rv.id', ids as string[]);
  return rows.map(toSummary);
}

export interface ReviewEntry {
  id: string;
  event: 'submitted' | 'approved' | 'revise' | 'retired' | 'comment';
  fromStatus: VersionStatus | null;
  toStatus: VersionStatus | null;
  body: string;
  actor: PersonRef & { role: Role };
  at: string;
}

export async function reviewHistory(versionId: string, trx: Knex | Knex.Transaction = db()): Promise<ReviewEntry[]> {
  const rows = await trx('reviews as rw')
    .join('users as u', 'u.id', 'rw.actor_id')
    .where('rw.reduced_version_id', versionId)
    .orderBy('rw.id', 'asc')
    .select('rw.*', 'u.name as actor_name', 'u.role as actor_role');
  return rows.map((r) => ({
    id: String(r.id),
    event: r.event,
    fromStatus: r.from_status,
    toStatus: r.to_status,
    body: r.body,
    actor: { id: r.actor_id, name: r.actor_name, role: r.actor_role },
    at: (r.created_at as Date).toISOString(),
  }));
}

export interface ReviewSheet {
  version: VersionSummary;
  history: ReviewEntry[];
  /** What this person may do now, per the state machine. */
  actions: ReviewAction[];
  /** Actions their role allows in this state but that are withheld from them here, with the reason. */
  withheld: { action: ReviewAction; reason: string }[];
  canComment: boolean;
  /** Versions made from this one (a revision's next draft, or a re-run on a newer source version). */
  successors: { id: string; number: number; status: VersionStatus; sourceNumber: number }[];
  /** The author may start the next draft: the version was sent back and no next draft exists yet. */
  canStartNextDraft: boolean;
}

export async function reviewSheet(versionId: string, viewer: Actor): Promise<ReviewSheet | null> {
  const version = await versionSummary(versionId);
  if (!version) return null;
  const [history, successorRows] = await Promise.all([
    reviewHistory(versionId),
    versionLineage(db()).where('rv.predecessor_id', versionId).orderBy('rv.number'),
  ]);
  const successors = successorRows.map((s) => ({ id: s.versionId, number: s.versionNumber, status: s.status, sourceNumber: s.sourceVersionNumber }));
  const actions = availableActions(version.status, viewer, version.author.id);
  const withheld = (['submit', 'approve', 'revise', 'retire'] as const)
    .map((action) => ({ action, reason: withheldReason(action, version.status, viewer, version.author.id) }))
    .filter((w): w is { action: ReviewAction; reason: string } => w.reason !== null);
  const sameSourceSuccessor = successors.some((s) => s.sourceNumber === version.source.number);
  return {
    version,
    history,
    actions,
    withheld,
    canComment: COMMENT_ROLES.includes(viewer.role),
    successors,
    canStartNextDraft:
      version.status === 'revise' && viewer.id === version.author.id && NEXT_DRAFT_ROLES.includes(viewer.role) && !sameSourceSuccessor,
  };
}

export interface QueueEntry {
  versionId: string;
  reducedModelName: string;
  reducedModelSlug: string;
  number: number;
  /** The comparison page of the version (full against reduced), which carries the review panel. */
  comparisonUrl: string;
  authorName: string;
  authorId: string;
  submittedAt: string;
  sourceModelName: string;
  sourceNumber: number;
  method: string;
  order: number;
  fullOrder: number | null;
  hInfinityErrorRelative: number | null;
  errorBound: number | null;
  acceptancePassed: boolean | null;
  /** the stored verdict: pass, fail or not-checked; null when the recipe set no band */
  acceptance: AcceptanceStatus | null;
  upstreamChanged: boolean;
  newestSourceNumber: number;
  note: string | null;
  /** The viewer may approve or send back this one (a reviewer, and not its author). */
  yoursToDecide: boolean;
}

const numberOrNull = (v: unknown) => (typeof v === 'number' && Number.isFinite(v) ? v : null);

/** Versions waiting for review, oldest submission first (the one waiting longest comes first). */
export async function reviewQueue(viewer: Actor): Promise<QueueEntry[]> {
  const rows = await summaryQuery(db()).where('rv.status', 'in_review').orderBy('rv.submitted_at', 'asc');
  const notes = await latestSubmissionNotes(rows.map((r) => r.versionId));
  return rows.map((r) => {
    const s = toSummary(r);
    const figures = s.accuracy?.figures ?? {};
    return {
      versionId: s.id,
      reducedModelName: s.reducedModel.name,
      reducedModelSlug: s.reducedModel.slug,
      number: s.number,
      comparisonUrl: reducedVersionPath(s.reducedModel.slug, s.number),
      authorName: s.author.name,
      authorId: s.author.id,
      submittedAt: s.submittedAt!,
      sourceModelName: s.source.modelName,
      sourceNumber: s.source.number,
      method: s.recipe.method,
      order: s.order,
      fullOrder: numberOrNull(figures.fullOrder),
      hInfinityErrorRelative: numberOrNull(figures.hInfinityErrorRelative),
      errorBound: numberOrNull(figures.errorBound),
      acceptancePassed: s.accuracy?.acceptancePassed ?? null,
      acceptance: s.acceptance?.status ?? null,
      upstreamChanged: s.upstreamChanged,
      newestSourceNumber: s.newestSourceNumber,
      note: notes.get(s.id) ?? null,
      yoursToDecide: availableActions('in_review', viewer, s.author.id).includes('approve'),
    };
  });
}

async function latestSubmissionNotes(versionIds: string[]): Promise<Map<string, string>> {
  if (versionIds.length === 0) return new Map();
  const rows = await db()('reviews')
    .distinctOn('reduced_version_id')
    .whereIn('reduced_version_id', versionIds)
    .andWhere('event', 'submitted')
    .orderBy([{ column: 'reduced_version_id' }, { column: 'id', order: 'desc' }])
    .select('reduced_version_id', 'body');
  return new Map(rows.map((r) => [r.reduced_version_id, r.body]));
}

export interface DecisionEntry {
  versionId: string;
  reducedModelName: string;
  number: number;
  event: 'approved' | 'revise' | 'retired';
  actorName: string;
  authorName: string;
  body: string;
  at: string;
}

export async function recentDecisions(limit = 20): Promise<DecisionEntry[]> {
  const rows = await versionLineage<{ event: DecisionEntry['event']; body: string; decidedAt: Date; actorName: string; authorName: string }>(db(), {
    event: 'rw.event',
    body: 'rw.body',
    decidedAt: 'rw.created_at',
    actorName: 'actor.name',
    authorName: 'author.name',
  })
    .join('reviews as rw', 'rw.reduced_version_id', 'rv.id')
    .join('users as actor', 'actor.id', 'rw.actor_id')
    .join('users as author', 'author.id', 'rw.version_author_id')
    .whereIn('rw.event', ['approved', 'revise', 'retired'])
    .orderBy('rw.id', 'desc')
    .limit(limit);
  return rows.map((r) => ({
    versionId: r.versionId,
    reducedModelName: r.reducedModelName,
    number: r.versionNumber,
    event: r.event,
    actorName: r.actorName,
    authorName: r.authorName,
    body: r.body,
    at: r.decidedAt.toISOString(),
  }));
}
