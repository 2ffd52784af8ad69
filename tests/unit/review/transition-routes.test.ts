// The four review-transition routes (app/api/reduced-versions/[id]/{submit,approve,revise,retire}/route.ts),
// one handler each from lib/review/transition-route.ts: the role of TRANSITIONS[action] is checked before the
// body is read, the id and the one text the transition needs are validated with the field named, and the
// transition is applied with that text. The guard and the transition are stand-ins here (the session needs
// the running app; tests/browser/route-guards.ts calls these routes over HTTP as every role, and
// tests/integration/review-transitions.test.ts applies the transitions to the database).
import { beforeEach, describe, expect, it, vi } from 'vitest';
import { ApiError } from '@/lib/http';
import { TRANSITIONS, type ReviewAction } from '@/lib/review/state-machine';
import type { Role } from '@/lib/roles';

const session = { role: 'viewer' as Role };
const calls: { guard: Role[][]; transitions: unknown[][] } = { guard: [], transitions: [] };

vi.mock('@/lib/auth', () => ({
  requireRole: async (...roles: Role[]) => {
    calls.guard.push(roles);
    if (!roles.includes(session.role)) throw new ApiError(403, 'forbidden', 'Your role does not allow this action.');
    return { id: 'u1', email: 'u1@test.quillmere.example', name: 'Una Tester', role: session.role };
  },
}));
vi.mock('@/lib/review/transitions', () => ({
  transitionVersion: async (...args: unknown[]) => {
    calls.transitions.push(args);
    return { version: { id: args[0] }, mailsQueued: 0 };
  },
}));

const routes = {
  submit: () => import('@/app/api/reduced-versions/[id]/submit/route'),
  approve: () => import('@/app/api/reduced-versions/[id]/approve/route'),
  revise: () => import('@/app/api/reduced-versions/[id]/revise/route'),
  retire: () => import('@/app/api/reduced-versions/[id]/retire/route'),
};
const ID = '00000000-0000-4000-8000-000000000000';

async function post(action: ReviewAction, body: string, id = ID) {
  const { POST } = await routes[action]();
  const response = await POST(new Request(`http://modeshelf.test/api/reduced-versions/${id}/${action}`, { method: 'POST', body }), {
    params: Promise.resolve({ id }),
  });
  return { status: response.status, body: await response.json() };
}

beforeEach(() => {
  calls.guard = [];
  calls.transitions = [];
});

describe.each(['submit', 'approve', 'revise', 'retire'] as const)('POST …/%s', (action) => {
  const rule = TRANSITIONS[action];
  const allowed = rule.roles[0];
  const refused = (['viewer', 'engineer', 'reviewer', 'admin'] as const).find((r) => !rule.roles.includes(r))!;

  it('checks the transition’s roles before reading the body', async () => {
    session.role = refused;
    const res = await post(action, 'not json');
    expect(res.status).toBe(403);
    expect(calls.guard).toEqual([[...rule.roles]]);
    expect(calls.transitions).toEqual([]);
  });

  it('names the field of a bad id or a missing text, and changes nothing', async () => {
    session.role = allowed;
    expect(await post(action, JSON.stringify({ [rule.textField]: 'fine' }), 'v7')).toMatchObject({ status: 400, body: { error: { field: 'id' } } });
    const missing = await post(action, JSON.stringify({ [rule.textField]: '   ' }));
    expect(missing.status).toBe(400);
    expect(missing.body.error.field).toBe(rule.textField);
    expect(missing.body.error.message).toMatch(new RegExp(`^${rule.textField}: .+ is required\\.$`));
    expect(await post(action, JSON.stringify({ [rule.textField]: 'fine', other: 1 }))).toMatchObject({ status: 400 });
    expect(calls.transitions).toEqual([]);
  });

  it(`applies ${action} with the ${rule.textField} given`, async () => {
    session.role = allowed;
    const res = await post(action, JSON.stringify({ [rule.textField]: '  matches the full model  ' }));
    expect(res).toEqual({ status: 200, body: { version: { id: ID }, mailsQueued: 0 } });
    expect(calls.transitions).toEqual([[ID, action, { id: 'u1', email: 'u1@test.quillmere.example', name: 'Una Tester', role: allowed }, 'matches the full model']]);
  });
});
