// Review of reduced-model versions: the transitions of lib/review/state-machine.ts applied to the database,
// the comment thread, the next draft after a revise decision, and the reads behind the Reviews page and a
// version's review sheet.
//
// Each transition is one transaction: lock the version row (SELECT … FOR UPDATE), decide with the state
// machine on what is now in the row, update only WHERE status is still the expected one, append the
// review history, write audit_events, and queue the mails. Of two people deciding on one version at the
// same moment, the second waits for the first's lock, then finds the new state and is refused with 409.
// The mails are queued inside the transaction and sent after it commits (lib/notifications.ts).
import type { Knex } from 'knex';
import { z } from 'zod';
import { db } from '@/lib/db';
import { appUrl } from '@/lib/config';
import { recordAudit } from '@/lib/audit';
import { storedAcceptance, type AcceptanceStatus, type StoredAcceptance } from '@/lib/acceptance';
import { ApiError, notFound } from '@/lib/http';
import type { Role } from '@/lib/roles';
import {
  availableActions,
  decideTransition,
  REVIEW_TEXT_MAX,
  TRANSITIONS,
  withheldReason,
  type Refusal,
  type ReviewAction,
  type VersionStatus,
} from '@/lib/review/state-machine';
import { queueMail, recipientsFor } from '@/lib/notifications';
import { reviewDecidedMail, reviewRequestedMail } from '@/lib/notification-mail';
import { kickNotificationSender } from '@/lib/notification-sender';
import { reducedVersionPath } from '@/lib/reduced-models';

export interface Actor {
  id: string;
  name: string;
  role: Role;
}

const text = (name: 'note' | 'comment' | 'reason' | 'body', what: string) =>
  z
    .string({ error: `${what} is required.` })
    .trim()
    .min(1, `${what} is required.`)
    .max(REVIEW_TEXT_MAX, `${what} must be at most ${REVIEW_TEXT_MAX} characters.`);

/** Request bodies of the four transitions and of a comment; each names the one text it needs. */
export const transitionBodySchemas = {
  submit: z.object({ note: text('note', 'A note for the reviewer') }).strict(),
  approve: z.object({ comment: text('comment', 'A comment for the author') }).strict(),
  revise: z.object({ comment: text('comment', 'A comment for the author') }).strict(),
  retire: z.object({ reason: text('reason', 'A reason for retiring') }).strict(),
} as const;
export const commentBodySchema = z.object({ body: text('body', 'A comment') }).strict();

export const versionIdSchema = z.object({ id: z.uuid({ error: 'The reduced model version id must be a UUID.' }) });

export function refusalError(refusal: Refusal): ApiError {
  return new ApiError(refusal.status, refusal.code, refusal.message, refusal.field);
}

// The database's own refusals (migration 20261202000200_reviews), should a path here ever reach them.
function fromDatabaseRefusal(err: unknown): never {
  const e = err as { code?: string; constraint?: string; message?: string };
  if (e && (e.code === '23514' || e.code === '23001') && typeof e.constraint === 'string' && e.constraint.startsWith('reduced_versions_')) {
    throw new ApiError(409, 'state_conflict', `The database refused the change: ${e.message}`);
  }
  if (e && e.code === '23514' && (e.constraint === 'reviews_four_eyes_check' || e.constraint === 'reviews_submitted_by_author_check')) {
    throw new ApiError(403, 'four_eyes', `The database refused the review: ${e.message}`);
  }
  throw err;
}

export function reviewUrl(versionId: string): string {
  return `${appUrl()}/reviews/${versionId}`;
}

// ---------------------------------------------------------------------------------------------------------
// Reads

export interface PersonRef {
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

const iso = (d: Date | null | undefined) => (d ? d.toISOString() : null);

function summaryQuery(trx: Knex | Knex.Transaction) {
  return trx('reduced_versions as rv')
    .join('reduced_models as rm', 'rm.id', 'rv.reduced_model_id')
    .join('users as au', 'au.id', 'rv.author_id')
    .join('source_versions as sv', 'sv.id', 'rv.source_version_id')
    .join('source_models as sm', 'sm.id', 'sv.source_model_id')
    .join('recipes as r', 'r.id', 'rv.recipe_id')
    .join('reduced_version_upstream as up', 'up.reduced_version_id', 'rv.id')
    .leftJoin('reduced_versions as pv', 'pv.id', 'rv.predecessor_id')
    .leftJoin('source_versions as psv', 'psv.id', 'pv.source_version_id')
    .leftJoin('users as apu', 'apu.id', 'rv.approved_by')
    .leftJoin('users as reu', 'reu.id', 'rv.retired_by')
    .leftJoin('accuracy_reports as ar', 'ar.reduced_version_id', 'rv.id')
    .select(
      'rv.id',
      'rv.number',
      'rv.status',
      'rv.created_at',
      'rv.submitted_at',
      'rv.order',
      'rv.states_kept_unstable',
      'rv.matrices_sha256',
      'rv.input_checksum',
      'rv.engine_version',
      'rv.approved_at',
      'rv.approved_figures',
      'rv.retired_at',
      'rv.retired_reason',
      'rm.id as rm_id',
      'rm.name as rm_name',
      'rm.slug as rm_slug',
      'au.id as author_id',
      'au.name as author_name',
      'sm.id as sm_id',
      'sm.name as sm_name',
      'sm.slug as sm_slug',
      'sm.time_base as sm_time_base',
      'sv.id as sv_id',
      'sv.number as sv_number',
      'sv.checksum as sv_checksum',
      'up.newest_source_number',
      'up.newest_source_version_id',
      'up.upstream_changed',
      'r.id as recipe_id',
      'r.method as recipe_method',
      'r.order as recipe_order',
      'r.tolerance as recipe_tolerance',
      'r.options as recipe_options',
      'pv.id as pv_id',
      'pv.number as pv_number',
      'psv.number as psv_number',
      'apu.id as approver_id',
      'apu.name as approver_name',
      'reu.id as retirer_id',
      'reu.name as retirer_name',
      'ar.figures as ar_figures',
      'ar.acceptance_passed as ar_acceptance_passed',
    );
}

type SummaryRow = Record<string, any>;

function toSummary(r: SummaryRow): VersionSummary {
  return {
    id: r.id,
    number: r.number,
    status: r.status,
    reducedModel: { id: r.rm_id, name: r.rm_name, slug: r.rm_slug },
    author: { id: r.author_id, name: r.author_name },
    createdAt: iso(r.created_at)!,
    submittedAt: iso(r.submitted_at),
    order: r.order,
    statesKeptUnstable: r.states_kept_unstable,
    matricesSha256: r.matrices_sha256,
    inputChecksum: r.input_checksum,
    engineVersion: r.engine_version,
    source: {
      modelId: r.sm_id,
      modelName: r.sm_name,
      modelSlug: r.sm_slug,
      versionId: r.sv_id,
      number: r.sv_number,
      checksum: r.sv_checksum,
      timeBase: r.sm_time_base || 's',
    },
    newestSourceNumber: r.newest_source_number,
    newestSourceVersionId: r.newest_source_version_id,
    upstreamChanged: r.upstream_changed,
    recipe: {
      id: r.recipe_id,
      method: r.recipe_method,
      order: r.recipe_order,
      tolerance: r.recipe_tolerance,
      options: r.recipe_options ?? {},
    },
    predecessor: r.pv_id ? { id: r.pv_id, number: r.pv_number, sourceNumber: r.psv_number } : null,
    approval: r.approved_at
      ? { by: { id: r.approver_id, name: r.approver_name }, at: iso(r.approved_at)!, figures: r.approved_figures }
      : null,
    retirement: r.retired_at
      ? { by: { id: r.retirer_id, name: r.retirer_name }, at: iso(r.retired_at)!, reason: r.retired_reason }
      : null,
    accuracy: r.ar_figures ? { figures: r.ar_figures, acceptancePassed: r.ar_acceptance_passed } : null,
    acceptance: r.ar_figures ? storedAcceptance(r.ar_figures, r.ar_acceptance_passed) : null,
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

export const COMMENT_ROLES: readonly Role[] = ['engineer', 'reviewer', 'admin'];
export const NEXT_DRAFT_ROLES: readonly Role[] = ['engineer'];

export async function reviewSheet(versionId: string, viewer: Actor): Promise<ReviewSheet | null> {
  const version = await versionSummary(versionId);
  if (!version) return null;
  const [history, successorRows] = await Promise.all([
    reviewHistory(versionId),
    db()('reduced_versions as rv')
      .join('source_versions as sv', 'sv.id', 'rv.source_version_id')
      .where('rv.predecessor_id', versionId)
      .orderBy('rv.number')
      .select('rv.id', 'rv.number', 'rv.status', 'sv.number as source_number'),
  ]);
  const successors = successorRows.map((s) => ({ id: s.id, number: s.number, status: s.status, sourceNumber: s.source_number }));
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
  const notes = await latestSubmissionNotes(rows.map((r) => r.id));
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
  const rows = await db()('reviews as rw')
    .join('reduced_versions as rv', 'rv.id', 'rw.reduced_version_id')
    .join('reduced_models as rm', 'rm.id', 'rv.reduced_model_id')
    .join('users as actor', 'actor.id', 'rw.actor_id')
    .join('users as author', 'author.id', 'rw.version_author_id')
    .whereIn('rw.event', ['approved', 'revise', 'retired'])
    .orderBy('rw.id', 'desc')
    .limit(limit)
    .select('rw.reduced_version_id', 'rw.event', 'rw.body', 'rw.created_at', 'rv.number', 'rm.name as rm_name', 'actor.name as actor_name', 'author.name as author_name');
  return rows.map((r) => ({
    versionId: r.reduced_version_id,
    reducedModelName: r.rm_name,
    number: r.number,
    event: r.event,
    actorName: r.actor_name,
    authorName: r.author_name,
    body: r.body,
    at: (r.created_at as Date).toISOString(),
  }));
}

// ---------------------------------------------------------------------------------------------------------
// Writes

interface LockedVersion {
  id: string;
  number: number;
  status: VersionStatus;
  author_id: string;
  reduced_model_id: string;
  matrices_sha256: string;
}

async function lockVersion(trx: Knex.Transaction, id: string): Promise<LockedVersion> {
  const row = await trx<LockedVersion>('reduced_versions')
    .where({ id })
    .forUpdate()
    .first('id', 'number', 'status', 'author_id', 'reduced_model_id', 'matrices_sha256');
  if (!row) throw notFound('That reduced model version');
  return row;
}

const AUDIT_ACTIONS: Record<ReviewAction, string> = {
  submit: 'reduced_version.submitted',
  approve: 'reduced_version.approved',
  revise: 'reduced_version.sent_back_for_revision',
  retire: 'reduced_version.retired',
};

export interface TransitionResult {
  version: VersionSummary;
  /** How many mails were queued by this change (sent after commit). */
  mailsQueued: number;
}

/**
 * Applies one review transition. `text` is the note (submit), comment (approve, revise) or reason
 * (retire). Throws ApiError 403 (role, four-eyes, not the author), 404, 409 (state changed, or no accuracy
 * report to review) or 400 (missing text).
 */
export async function transitionVersion(
  versionId: string,
  action: ReviewAction,
  actor: Actor,
  text: string,
  outer: Knex = db(),
): Promise<TransitionResult> {
  const rule = TRANSITIONS[action];
  const result = await outer
    .transaction(async (trx) => {
      const locked = await lockVersion(trx, versionId);
      const decision = decideTransition({ action, status: locked.status, actor, authorId: locked.author_id, text });
      if (!decision.ok) throw refusalError(decision.refusal);
      const body = text.trim();

      const patch: Record<string, unknown> = { status: rule.to, updated_at: trx.fn.now() };
      const report = await trx('accuracy_reports')
        .where({ reduced_version_id: versionId })
        .forShare()
        .first('figures', 'acceptance_passed', 'created_at');
      if (action === 'submit') {
        if (!report) {
          throw new ApiError(409, 'no_accuracy_report', 'This version has no accuracy report yet, so there is nothing to review; wait for its reduction to finish.');
        }
        patch.submitted_at = trx.raw('clock_timestamp()');
      } else if (action === 'approve') {
        if (!report) throw new ApiError(409, 'no_accuracy_report', 'This version has no accuracy report to approve.');
        const snapshot: ApprovalSnapshot = {
          figures: report.figures,
          acceptancePassed: report.acceptance_passed,
          matricesSha256: locked.matrices_sha256,
          reportCreatedAt: iso(report.created_at),
        };
        patch.approved_by = actor.id;
        patch.approved_at = trx.raw('clock_timestamp()');
        patch.approved_figures = JSON.stringify(snapshot);
      } else if (action === 'retire') {
        patch.retired_by = actor.id;
        patch.retired_at = trx.raw('clock_timestamp()');
        patch.retired_reason = body;
      }

      const updated = await trx('reduced_versions').where({ id: versionId, status: rule.from }).update(patch).returning('id');
      if (updated.length !== 1) {
        // Unreachable while the row lock holds; kept so a change to the locking can never double-apply.
        throw new ApiError(409, 'state_conflict', 'This version changed state while you were deciding; reload to see its current state.');
      }
      await trx('reviews').insert({
        reduced_version_id: versionId,
        version_author_id: locked.author_id,
        actor_id: actor.id,
        event: rule.event,
        from_status: rule.from,
        to_status: rule.to,
        body,
      });
      await recordAudit(trx, {
        actorId: actor.id,
        action: AUDIT_ACTIONS[action],
        subjectType: 'reduced_version',
        subjectId: versionId,
        details: { from: rule.from, to: rule.to, number: locked.number, reducedModelId: locked.reduced_model_id, [rule.textField]: body },
      });

      const version = (await versionSummary(versionId, trx))!;
      const mailsQueued = await queueTransitionMail(trx, action, version, actor, body);
      return { version, mailsQueued };
    })
    .catch(fromDatabaseRefusal);
  // An approval or retirement may also change what controller projects' pins resolve to; the round queues
  // those notices (lib/project-notices.ts) even when this transition queued no mail itself.
  if (result.mailsQueued > 0 || action === 'approve' || action === 'retire') kickNotificationSender();
  return result;
}

async function queueTransitionMail(
  trx: Knex.Transaction,
  action: ReviewAction,
  version: VersionSummary,
  actor: Actor,
  body: string,
): Promise<number> {
  const mention = { reducedModelName: version.reducedModel.name, number: version.number, url: reviewUrl(version.id) };
  let queued = 0;
  if (action === 'submit') {
    const reviewers = await recipientsFor(trx, 'review_requested', { roles: ['reviewer'], exclude: [version.author.id] });
    for (const reviewer of reviewers) {
      const content = reviewRequestedMail({ recipientName: reviewer.name, version: mention, authorName: actor.name, note: body });
      if (await queueMail(trx, { kind: 'review_requested', recipient: reviewer, content })) queued += 1;
    }
  } else if (action === 'approve' || action === 'revise') {
    const [author] = await recipientsFor(trx, 'review_decided', { userIds: [version.author.id] });
    if (author) {
      const content = reviewDecidedMail({
        recipientName: author.name,
        version: mention,
        reviewerName: actor.name,
        decision: action === 'approve' ? 'approved' : 'revise',
        comment: body,
      });
      if (await queueMail(trx, { kind: 'review_decided', recipient: author, content })) queued += 1;
    }
  }
  return queued;
}

/** Adds to a version's comment thread (any state). */
export async function addComment(versionId: string, actor: Actor, body: string): Promise<ReviewEntry> {
  if (!COMMENT_ROLES.includes(actor.role)) {
    throw new ApiError(403, 'forbidden', `Your role does not allow commenting on a version (it needs the ${COMMENT_ROLES.join(' or ')} role).`);
  }
  const text = body.trim();
  if (text.length === 0) throw new ApiError(400, 'invalid_request', 'body: A comment is required.', 'body');
  return db()
    .transaction(async (trx) => {
      const locked = await trx('reduced_versions').where({ id: versionId }).first('id', 'author_id', 'number');
      if (!locked) throw notFound('That reduced model version');
      const [row] = await trx('reviews')
        .insert({ reduced_version_id: versionId, version_author_id: locked.author_id, actor_id: actor.id, event: 'comment', body: text })
        .returning('id');
      await recordAudit(trx, {
        actorId: actor.id,
        action: 'reduced_version.commented',
        subjectType: 'reduced_version',
        subjectId: versionId,
        details: { number: locked.number },
      });
      const entry = (await reviewHistory(versionId, trx)).find((e) => e.id === String(row.id));
      return entry!;
    })
    .catch(fromDatabaseRefusal);
}

/**
 * Revise and resubmit: the author of a version sent back for revision starts its next draft version, a
 * copy of the revised one (same source version, recipe, matrices and accuracy report) that records the
 * revised version as its predecessor. The author then changes what the review asked for (a new reduction
 * into this reduced model, or an answer in the submission note) and submits the new version.
 */
export async function startNextDraft(versionId: string, actor: Actor): Promise<{ id: string; number: number }> {
  if (!NEXT_DRAFT_ROLES.includes(actor.role)) {
    throw new ApiError(403, 'forbidden', `Your role does not allow starting a new draft version (it needs the ${NEXT_DRAFT_ROLES.join(' or ')} role).`);
  }
  return db()
    .transaction(async (trx) => {
      const revised = await trx('reduced_versions').where({ id: versionId }).forUpdate().first();
      if (!revised) throw notFound('That reduced model version');
      if (revised.author_id !== actor.id) {
        throw new ApiError(403, 'not_author', 'Only the author of a version sent back for revision starts its next draft.');
      }
      if (revised.status !== 'revise') {
        throw new ApiError(409, 'state_conflict', `Only a version sent back for revision gets a next draft; this one is ${revised.status.replace('_', ' ')}.`);
      }
      const existing = await trx('reduced_versions')
        .where({ predecessor_id: versionId, source_version_id: revised.source_version_id })
        .first('number');
      if (existing) {
        throw new ApiError(409, 'next_draft_exists', `Version ${existing.number} has already been started from this one; continue there.`);
      }
      // Serialises version numbering within the reduced model against concurrent registrations.
      await trx('reduced_models').where({ id: revised.reduced_model_id }).forUpdate().first('id');
      const { max } = (await trx('reduced_versions').where({ reduced_model_id: revised.reduced_model_id }).max('number as max').first()) as { max: number };
      const [created] = await trx('reduced_versions')
        .insert({
          reduced_model_id: revised.reduced_model_id,
          number: max + 1,
          source_version_id: revised.source_version_id,
          recipe_id: revised.recipe_id,
          predecessor_id: revised.id,
          status: 'draft',
          order: revised.order,
          states_kept_unstable: revised.states_kept_unstable,
          matrices: JSON.stringify(revised.matrices),
          matrices_sha256: revised.matrices_sha256,
          input_checksum: revised.input_checksum,
          engine_version: revised.engine_version,
          author_id: actor.id,
        })
        .returning(['id', 'number']);
      const report = await trx('accuracy_reports').where({ reduced_version_id: versionId }).first();
      if (report) {
        await trx('accuracy_reports').insert({
          reduced_version_id: created.id,
          figures: JSON.stringify(report.figures),
          curves: JSON.stringify(report.curves),
          acceptance_passed: report.acceptance_passed,
        });
      }
      await recordAudit(trx, {
        actorId: actor.id,
        action: 'reduced_version.next_draft_started',
        subjectType: 'reduced_version',
        subjectId: created.id,
        details: { predecessorId: versionId, predecessorNumber: revised.number, number: created.number },
      });
      return { id: created.id as string, number: created.number as number };
    })
    .catch(fromDatabaseRefusal);
}
