// The writes of review: the transitions of lib/review/state-machine.ts applied to the database, the comment
// thread, and the next draft after a revise decision.
//
// Each transition is one transaction: lock the version row (SELECT … FOR UPDATE), decide with the state
// machine on what is now in the row, update only WHERE status is still the expected one, append the
// review history, write audit_events, and queue the mails. Of two people deciding on one version at the
// same moment, the second waits for the first's lock, then finds the new state and is refused with 409.
// The mails are queued inside the transaction and sent after it commits (lib/notifications/).
import type { Knex } from 'knex';
import { db } from '@/lib/db';
import { appUrl } from '@/lib/config';
import { recordAudit } from '@/lib/audit';
import { ApiError, notFound } from '@/lib/http';
import { decideTransition, TRANSITIONS, type Refusal, type ReviewAction, type VersionStatus } from '@/lib/review/state-machine';
import { COMMENT_ROLES, NEXT_DRAFT_ROLES, type Actor } from '@/lib/review/schemas';
import { iso, reviewHistory, versionSummary, type ApprovalSnapshot, type ReviewEntry, type VersionSummary } from '@/lib/review/queries';
import { insertDraftVersion } from '@/lib/reduced-models/registration';
import { kickNotificationSender, queueMail, recipientsFor, reviewDecidedMail, reviewRequestedMail } from '@/lib/notifications';

function refusalError(refusal: Refusal): ApiError {
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

function reviewUrl(versionId: string): string {
  return `${appUrl()}/reviews/${versionId}`;
}

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

interface TransitionResult {
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
  // those notices (lib/notifications/pin-notices.ts) even when this transition queued no mail itself.
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
      const report = await trx('accuracy_reports').where({ reduced_version_id: versionId }).first();
      const created = await insertDraftVersion(
        trx,
        {
          reducedModelId: revised.reduced_model_id,
          number: max + 1,
          sourceVersionId: revised.source_version_id,
          recipeId: revised.recipe_id,
          predecessorId: revised.id,
          order: revised.order,
          statesKeptUnstable: revised.states_kept_unstable,
          matrices: revised.matrices,
          matricesSha256: revised.matrices_sha256,
          inputChecksum: revised.input_checksum,
          engineVersion: revised.engine_version,
          authorId: actor.id,
        },
        report ? { figures: report.figures, curves: report.curves, acceptancePassed: report.acceptance_passed } : null,
      );
      await recordAudit(trx, {
        actorId: actor.id,
        action: 'reduced_version.next_draft_started',
        subjectType: 'reduced_version',
        subjectId: created.id,
        details: { predecessorId: versionId, predecessorNumber: revised.number, number: created.number },
      });
      return { id: created.id, number: created.number };
    })
    .catch(fromDatabaseRefusal);
}
