// The life of a reduced-model version (DEVELOPERS.md, "Review, lineage and notifications"), defined once.
// Every transition the shelf makes is decided here: which state it leaves and enters, which roles may take
// it, whether the actor must or must not be the version's author (the four-eyes rule), and the text it
// requires. lib/review/transitions.ts applies the decision inside a transaction; the database (migration
// 20261202000200_reviews) refuses the same impossible steps again, so a bug here cannot write one.
//
//   draft ──submit (author, note)──▶ in_review ──approve (reviewer ≠ author, comment)──▶ approved
//                                        │                                                 │
//                                        └──revise (reviewer ≠ author, comment)──▶ revise   └──retire (reviewer or admin, reason)──▶ retired
//
// `revise` and `retired` are terminal for their version: revise-and-resubmit (as in engineering document
// review) makes a new draft version, and a retired version stays downloadable by exact version only.
// Pure: no database, no React; imported by client components too (the review panel shows only the actions
// this table allows).
import type { Role } from '@/lib/roles';

export const VERSION_STATUSES = ['draft', 'in_review', 'approved', 'revise', 'retired'] as const;
export type VersionStatus = (typeof VERSION_STATUSES)[number];

export const REVIEW_ACTIONS = ['submit', 'approve', 'revise', 'retire'] as const;
export type ReviewAction = (typeof REVIEW_ACTIONS)[number];

/** What each transition leaves in the review history (the `reviews.event` column). */
export type ReviewEvent = 'submitted' | 'approved' | 'revise' | 'retired';

export interface TransitionRule {
  action: ReviewAction;
  from: VersionStatus;
  to: VersionStatus;
  /** Every role admitted, named explicitly (lib/roles.ts: roles are sets, not a ladder). */
  roles: readonly Role[];
  /** 'author': only the version's author; 'not_author': anyone but the author (four-eyes); 'any'. */
  actor: 'author' | 'not_author' | 'any';
  /** The request field that carries the required text, and what it is called in a sentence. */
  textField: 'note' | 'comment' | 'reason';
  event: ReviewEvent;
  /** Imperative label for buttons ("Approve"), and a gerund for messages ("approving"). */
  label: string;
  gerund: string;
}

export const TRANSITIONS: Readonly<Record<ReviewAction, TransitionRule>> = {
  submit: {
    action: 'submit',
    from: 'draft',
    to: 'in_review',
    roles: ['engineer'],
    actor: 'author',
    textField: 'note',
    event: 'submitted',
    label: 'Submit for review',
    gerund: 'submitting a version for review',
  },
  approve: {
    action: 'approve',
    from: 'in_review',
    to: 'approved',
    roles: ['reviewer'],
    actor: 'not_author',
    textField: 'comment',
    event: 'approved',
    label: 'Approve',
    gerund: 'approving a version',
  },
  revise: {
    action: 'revise',
    from: 'in_review',
    to: 'revise',
    roles: ['reviewer'],
    actor: 'not_author',
    textField: 'comment',
    event: 'revise',
    label: 'Send back for revision',
    gerund: 'sending a version back for revision',
  },
  retire: {
    action: 'retire',
    from: 'approved',
    to: 'retired',
    roles: ['reviewer', 'admin'],
    actor: 'any',
    textField: 'reason',
    event: 'retired',
    label: 'Retire',
    gerund: 'retiring a version',
  },
};

export const STATUS_LABELS: Readonly<Record<VersionStatus, string>> = {
  draft: 'draft',
  in_review: 'in review',
  approved: 'approved',
  revise: 'revise and resubmit',
  retired: 'retired',
};

/** Texts longer than this are refused (the reviews table holds at most 4000 characters). */
export const REVIEW_TEXT_MAX = 4000;

export interface TransitionRequest {
  action: ReviewAction;
  status: VersionStatus;
  actor: { id: string; role: Role };
  authorId: string;
  text: string;
}

export interface Refusal {
  status: 400 | 403 | 409;
  code: 'forbidden' | 'four_eyes' | 'not_author' | 'state_conflict' | 'invalid_request';
  message: string;
  field?: string;
}

export type TransitionDecision = { ok: true; rule: TransitionRule } | { ok: false; refusal: Refusal };

/** The refusal for a role the rule does not admit, worded like lib/auth.ts requireRole's. */
export function roleRefusal(rule: TransitionRule): Refusal {
  return {
    status: 403,
    code: 'forbidden',
    message: `Your role does not allow ${rule.gerund} (it needs the ${rule.roles.join(' or ')} role).`,
  };
}

/**
 * Decides one transition. Checks in the order a person can act on: role, then who they are relative to
 * the author, then the version's current state, then the text. The state check is what a concurrent loser
 * meets (lib/review/transitions.ts decides under a row lock), so its message says the state changed.
 */
export function decideTransition(request: TransitionRequest): TransitionDecision {
  const rule = TRANSITIONS[request.action];
  if (!rule.roles.includes(request.actor.role)) return { ok: false, refusal: roleRefusal(rule) };
  const isAuthor = request.actor.id === request.authorId;
  if (rule.actor === 'not_author' && isAuthor) {
    return {
      ok: false,
      refusal: {
        status: 403,
        code: 'four_eyes',
        message: `You authored this version, so you cannot ${rule.action === 'approve' ? 'approve it' : 'send it back for revision'}: a reviewer other than its author must decide (four-eyes rule).`,
      },
    };
  }
  if (rule.actor === 'author' && !isAuthor) {
    return {
      ok: false,
      refusal: { status: 403, code: 'not_author', message: 'Only the author of this version can submit it for review.' },
    };
  }
  if (request.status !== rule.from) {
    return {
      ok: false,
      refusal: {
        status: 409,
        code: 'state_conflict',
        message: `This version is ${STATUS_LABELS[request.status]}, not ${STATUS_LABELS[rule.from]}, so ${rule.gerund.replace(' a version', ' it')} is not possible${
          request.status === rule.to ? ': someone has just done it' : ''
        }. Reload to see its current state.`,
      },
    };
  }
  const text = request.text.trim();
  if (text.length === 0) {
    return {
      ok: false,
      refusal: { status: 400, code: 'invalid_request', field: rule.textField, message: `${rule.textField}: ${describeText(rule)} is required.` },
    };
  }
  if (text.length > REVIEW_TEXT_MAX) {
    return {
      ok: false,
      refusal: {
        status: 400,
        code: 'invalid_request',
        field: rule.textField,
        message: `${rule.textField}: ${describeText(rule)} must be at most ${REVIEW_TEXT_MAX} characters.`,
      },
    };
  }
  return { ok: true, rule };
}

/** What the text field is for, in a phrase ("A note for the reviewer"). */
export function describeText(rule: TransitionRule): string {
  switch (rule.textField) {
    case 'note':
      return 'A note for the reviewer';
    case 'comment':
      return 'A comment for the author';
    case 'reason':
      return 'A reason for retiring';
  }
}

/** The actions this person may take on a version in this state (what the review panel offers). */
export function availableActions(status: VersionStatus, actor: { id: string; role: Role }, authorId: string): ReviewAction[] {
  return REVIEW_ACTIONS.filter((action) => {
    const decision = decideTransition({ action, status, actor, authorId, text: 'x' });
    return decision.ok;
  });
}

/** Why an action the person's role allows is withheld here (shown in the panel instead of a button). */
export function withheldReason(
  action: ReviewAction,
  status: VersionStatus,
  actor: { id: string; role: Role },
  authorId: string,
): string | null {
  const rule = TRANSITIONS[action];
  if (!rule.roles.includes(actor.role) || status !== rule.from) return null;
  const decision = decideTransition({ action, status, actor, authorId, text: 'x' });
  return decision.ok ? null : decision.refusal.message;
}

/** The states nothing leaves. */
export function isTerminal(status: VersionStatus): boolean {
  return !Object.values(TRANSITIONS).some((rule) => rule.from === status);
}
