// The review life of a reduced-model version as a specification: every (state, action, role, author or
// not) combination is either one of the allowed transitions listed below, straight from issue 6 and
// DEVELOPERS.md ("Review, lineage and notifications"), or refused with the reason a person can act on. The expected table is written out here by
// hand, independently of TRANSITIONS, so a change to the state machine that is not also a change to the
// specification fails.
import { describe, expect, it } from 'vitest';
import {
  availableActions,
  decideTransition,
  isTerminal,
  REVIEW_ACTIONS,
  REVIEW_TEXT_MAX,
  VERSION_STATUSES,
  withheldReason,
  type ReviewAction,
  type VersionStatus,
} from '@/lib/review/state-machine';
import { ROLES, type Role } from '@/lib/roles';

const AUTHOR = 'author-id';
const OTHER = 'someone-else';

// [from, action, role, actor is the author] → to. Everything not listed is refused.
const ALLOWED: readonly [VersionStatus, ReviewAction, Role, boolean, VersionStatus][] = [
  ['draft', 'submit', 'engineer', true, 'in_review'],
  ['in_review', 'approve', 'reviewer', false, 'approved'],
  ['in_review', 'revise', 'reviewer', false, 'revise'],
  ['approved', 'retire', 'reviewer', false, 'retired'],
  ['approved', 'retire', 'reviewer', true, 'retired'],
  ['approved', 'retire', 'admin', false, 'retired'],
  ['approved', 'retire', 'admin', true, 'retired'],
];

// Which state each action leaves (issue 6): the state conflict refusal applies outside it.
const FROM: Record<ReviewAction, VersionStatus> = { submit: 'draft', approve: 'in_review', revise: 'in_review', retire: 'approved' };
const ROLES_OF: Record<ReviewAction, readonly Role[]> = {
  submit: ['engineer'],
  approve: ['reviewer'],
  revise: ['reviewer'],
  retire: ['reviewer', 'admin'],
};

const cases = VERSION_STATUSES.flatMap((status) =>
  REVIEW_ACTIONS.flatMap((action) =>
    ROLES.flatMap((role) => [true, false].map((isAuthor) => ({ status, action, role, isAuthor }))),
  ),
);

function expectedCode(c: (typeof cases)[number]): string | null {
  if (ALLOWED.some(([from, action, role, isAuthor]) => from === c.status && action === c.action && role === c.role && isAuthor === c.isAuthor)) {
    return null;
  }
  if (!ROLES_OF[c.action].includes(c.role)) return 'forbidden';
  if ((c.action === 'approve' || c.action === 'revise') && c.isAuthor) return 'four_eyes';
  if (c.action === 'submit' && !c.isAuthor) return 'not_author';
  if (c.status !== FROM[c.action]) return 'state_conflict';
  throw new Error(`the specification above does not decide ${JSON.stringify(c)}`);
}

describe('the review state machine', () => {
  it(`decides all ${cases.length} combinations of state, action, role and authorship`, () => {
    expect(cases).toHaveLength(VERSION_STATUSES.length * REVIEW_ACTIONS.length * ROLES.length * 2);
  });

  it.each(
    cases.map((c) => [`${c.status} —${c.action}→ as ${c.role}${c.isAuthor ? ' (author)' : ''}`, c] as const),
  )('%s', (_label, c) => {
    const decision = decideTransition({
      action: c.action,
      status: c.status,
      actor: { id: c.isAuthor ? AUTHOR : OTHER, role: c.role },
      authorId: AUTHOR,
      text: 'Checked the Bode plot and the error bound.',
    });
    const code = expectedCode(c);
    if (code === null) {
      expect(decision.ok).toBe(true);
      const to = ALLOWED.find(([from, action, role, a]) => from === c.status && action === c.action && role === c.role && a === c.isAuthor)![4];
      if (decision.ok) expect(decision.rule.to).toBe(to);
    } else {
      expect(decision.ok).toBe(false);
      if (!decision.ok) {
        expect(decision.refusal.code).toBe(code);
        expect(decision.refusal.status).toBe(code === 'state_conflict' ? 409 : 403);
      }
    }
  });

  it('refuses the author approving their own version with the four-eyes message, whatever their role', () => {
    const decision = decideTransition({ action: 'approve', status: 'in_review', actor: { id: AUTHOR, role: 'reviewer' }, authorId: AUTHOR, text: 'fine' });
    expect(decision).toMatchObject({ ok: false, refusal: { status: 403, code: 'four_eyes' } });
    if (!decision.ok) expect(decision.refusal.message).toMatch(/You authored this version.*four-eyes rule/);
  });

  it('words a role refusal like the route guard does, naming every admitted role', () => {
    const decision = decideTransition({ action: 'retire', status: 'approved', actor: { id: OTHER, role: 'viewer' }, authorId: AUTHOR, text: 'x' });
    expect(decision).toMatchObject({ ok: false, refusal: { code: 'forbidden' } });
    if (!decision.ok) expect(decision.refusal.message).toBe('Your role does not allow retiring a version (it needs the reviewer or admin role).');
  });

  it('tells the loser of a race that someone has just done it', () => {
    const decision = decideTransition({ action: 'approve', status: 'approved', actor: { id: OTHER, role: 'reviewer' }, authorId: AUTHOR, text: 'ok' });
    expect(decision).toMatchObject({ ok: false, refusal: { status: 409, code: 'state_conflict' } });
    if (!decision.ok) expect(decision.refusal.message).toMatch(/is approved, not in review.*someone has just done it/);
  });

  it.each([
    ['submit', 'draft', 'engineer', AUTHOR, 'note'],
    ['approve', 'in_review', 'reviewer', OTHER, 'comment'],
    ['revise', 'in_review', 'reviewer', OTHER, 'comment'],
    ['retire', 'approved', 'admin', OTHER, 'reason'],
  ] as const)('requires the text of %s (field %5$s), blank or too long', (action, status, role, actorId, field) => {
    for (const text of ['', '   \n ', 'x'.repeat(REVIEW_TEXT_MAX + 1)]) {
      const decision = decideTransition({ action, status, actor: { id: actorId, role }, authorId: AUTHOR, text });
      expect(decision).toMatchObject({ ok: false, refusal: { status: 400, code: 'invalid_request', field } });
    }
    expect(decideTransition({ action, status, actor: { id: actorId, role }, authorId: AUTHOR, text: 'x'.repeat(REVIEW_TEXT_MAX) }).ok).toBe(true);
  });

  it('has revise and retired as its only terminal states', () => {
    expect(VERSION_STATUSES.filter(isTerminal)).toEqual(['revise', 'retired']);
  });

  it('offers each person exactly the actions they may take', () => {
    expect(availableActions('in_review', { id: OTHER, role: 'reviewer' }, AUTHOR)).toEqual(['approve', 'revise']);
    expect(availableActions('in_review', { id: AUTHOR, role: 'reviewer' }, AUTHOR)).toEqual([]);
    expect(availableActions('draft', { id: AUTHOR, role: 'engineer' }, AUTHOR)).toEqual(['submit']);
    expect(availableActions('draft', { id: OTHER, role: 'engineer' }, AUTHOR)).toEqual([]);
    expect(availableActions('approved', { id: OTHER, role: 'admin' }, AUTHOR)).toEqual(['retire']);
    expect(availableActions('approved', { id: OTHER, role: 'viewer' }, AUTHOR)).toEqual([]);
    expect(availableActions('retired', { id: OTHER, role: 'admin' }, AUTHOR)).toEqual([]);
  });

  it('explains an action withheld by the four-eyes rule, and says nothing where the role or state rules it out', () => {
    expect(withheldReason('approve', 'in_review', { id: AUTHOR, role: 'reviewer' }, AUTHOR)).toMatch(/four-eyes/);
    expect(withheldReason('approve', 'in_review', { id: AUTHOR, role: 'engineer' }, AUTHOR)).toBeNull();
    expect(withheldReason('approve', 'draft', { id: AUTHOR, role: 'reviewer' }, AUTHOR)).toBeNull();
    expect(withheldReason('submit', 'draft', { id: OTHER, role: 'engineer' }, AUTHOR)).toMatch(/Only the author/);
  });
});
