// Every route handler that changes data, and the roles it admits. tests/browser/api-refusals.test.ts calls
// each one over HTTP against the built app as every role and as a visitor with no session;
// tests/unit/lib/route-inventory.test.ts fails when a route handler exists that this list does not name.
// A new data-changing route must be added here (or to PUBLIC_MUTATIONS, with the reason).
import type { Role } from '@/lib/roles';

export type Method = 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';

export interface GuardedRoute {
  method: Method;
  /** Relative to app/, e.g. 'api/admin/people/[id]/route.ts'. */
  file: string;
  /** Path to call; `{person}` is replaced by the id of a real person. */
  path: string;
  allowed: readonly Role[];
  /**
   * A body that passes the role check but is then refused by validation, so the admitted role's call
   * proves the guard let it through (400) without changing anything.
   */
  invalidBody?: unknown;
}

export const GUARDED_ROUTES: readonly GuardedRoute[] = [
  { method: 'POST', file: 'api/admin/people/route.ts', path: '/api/admin/people', allowed: ['admin'], invalidBody: { email: 'not-an-address', name: 'X', role: 'viewer' } },
  { method: 'PATCH', file: 'api/admin/people/[id]/route.ts', path: '/api/admin/people/{person}', allowed: ['admin'], invalidBody: { role: 'superuser' } },
  { method: 'POST', file: 'api/admin/people/[id]/link/route.ts', path: '/api/admin/people/not-a-uuid/link', allowed: ['admin'] },
  // Controller projects: the shelf role is checked here; membership of the project in lib/projects.ts
  // (tests/integration/projects.test.ts, pull-api.test.ts).
  { method: 'POST', file: 'api/projects/route.ts', path: '/api/projects', allowed: ['engineer'], invalidBody: { name: '' } },
  { method: 'PATCH', file: 'api/projects/[project]/route.ts', path: '/api/projects/no-such-project', allowed: ['engineer'], invalidBody: { sampleTime: -1 } },
  { method: 'POST', file: 'api/projects/[project]/members/route.ts', path: '/api/projects/no-such-project/members', allowed: ['engineer'], invalidBody: { email: 'not-an-address' } },
  { method: 'DELETE', file: 'api/projects/[project]/members/[user]/route.ts', path: '/api/projects/no-such-project/members/not-a-uuid', allowed: ['engineer'] },
  { method: 'POST', file: 'api/projects/[project]/pins/route.ts', path: '/api/projects/no-such-project/pins', allowed: ['engineer'], invalidBody: { reducedModel: 'zone-rom', mode: 'sometimes' } },
  { method: 'PATCH', file: 'api/projects/[project]/pins/[pin]/route.ts', path: '/api/projects/no-such-project/pins/not-a-uuid', allowed: ['engineer'] },
  { method: 'DELETE', file: 'api/projects/[project]/pins/[pin]/route.ts', path: '/api/projects/no-such-project/pins/not-a-uuid', allowed: ['engineer'] },
  { method: 'POST', file: 'api/projects/[project]/tokens/route.ts', path: '/api/projects/no-such-project/tokens', allowed: ['engineer'], invalidBody: { name: '' } },
  { method: 'POST', file: 'api/projects/[project]/tokens/[token]/revoke/route.ts', path: '/api/projects/no-such-project/tokens/not-a-uuid/revoke', allowed: ['engineer'] },
  // Review (issue 6): roles from lib/review/state-machine.ts; four-eyes, authorship and state are decided
  // under the row lock (tests/integration/review-transitions.test.ts). The id is well formed but names no
  // version, so an admitted role's valid call would answer 404 and changes nothing.
  { method: 'POST', file: 'api/reduced-versions/[id]/submit/route.ts', path: '/api/reduced-versions/00000000-0000-4000-8000-000000000000/submit', allowed: ['engineer'], invalidBody: { note: '   ' } },
  { method: 'POST', file: 'api/reduced-versions/[id]/approve/route.ts', path: '/api/reduced-versions/00000000-0000-4000-8000-000000000000/approve', allowed: ['reviewer'], invalidBody: { comment: '' } },
  { method: 'POST', file: 'api/reduced-versions/[id]/revise/route.ts', path: '/api/reduced-versions/00000000-0000-4000-8000-000000000000/revise', allowed: ['reviewer'], invalidBody: {} },
  { method: 'POST', file: 'api/reduced-versions/[id]/retire/route.ts', path: '/api/reduced-versions/00000000-0000-4000-8000-000000000000/retire', allowed: ['reviewer', 'admin'], invalidBody: { reason: '' } },
  { method: 'POST', file: 'api/reduced-versions/[id]/comments/route.ts', path: '/api/reduced-versions/00000000-0000-4000-8000-000000000000/comments', allowed: ['engineer', 'reviewer', 'admin'], invalidBody: { body: '' } },
  { method: 'POST', file: 'api/reduced-versions/[id]/next-draft/route.ts', path: '/api/reduced-versions/00000000-0000-4000-8000-000000000000/next-draft', allowed: ['engineer'] },
  { method: 'POST', file: 'api/reduced-versions/[id]/rerun/route.ts', path: '/api/reduced-versions/00000000-0000-4000-8000-000000000000/rerun', allowed: ['engineer'] },
  // Source models and reductions (issue 5): uploads are multipart (a JSON body is refused as not multipart,
  // 400) and streamed, so proxy.ts leaves /api/uploads/ to the handlers' own guard.
  { method: 'POST', file: 'api/uploads/source-models/route.ts', path: '/api/uploads/source-models', allowed: ['engineer'], invalidBody: {} },
  { method: 'POST', file: 'api/uploads/input-signals/route.ts', path: '/api/uploads/input-signals', allowed: ['engineer', 'reviewer'], invalidBody: {} },
  { method: 'POST', file: 'api/reductions/route.ts', path: '/api/reductions', allowed: ['engineer'], invalidBody: { sourceVersionId: 'not-a-uuid' } },
  { method: 'POST', file: 'api/jobs/[id]/retry/route.ts', path: '/api/jobs/not-a-uuid/retry', allowed: ['engineer'] },
  // Cancel (issue 14): the role check admits whoever can queue a job; only its owner or an admin then
  // passes (lib/jobs/jobs.ts, tests/integration/jobs-cancel.test.ts: another engineer 403).
  { method: 'POST', file: 'api/jobs/[id]/cancel/route.ts', path: '/api/jobs/not-a-uuid/cancel', allowed: ['engineer', 'reviewer', 'admin'] },
  // Everyone's own notification settings: nobody is refused by role, a visitor is (401).
  { method: 'PATCH', file: 'api/profile/notifications/route.ts', path: '/api/profile/notifications', allowed: ['viewer', 'engineer', 'reviewer', 'admin'], invalidBody: { reviewDecided: 'yes' } },
];

/** Admin-only reads, refused the same way. */
export const GUARDED_READS: readonly GuardedRoute[] = [
  { method: 'GET', file: 'api/admin/people/route.ts', path: '/api/admin/people', allowed: ['admin'] },
  { method: 'GET', file: 'api/admin/mail/route.ts', path: '/api/admin/mail', allowed: ['admin'] },
];

/** Data-changing routes that take no session, and why that is right. */
export const PUBLIC_MUTATIONS: readonly { method: Method; file: string; why: string }[] = [
  { method: 'POST', file: 'api/auth/[...nextauth]/route.ts', why: "next-auth's sign-in and sign-out endpoints: they establish the session" },
  { method: 'POST', file: 'api/links/redeem/route.ts', why: 'the single-use token of an invitation or reset link is the authority' },
  { method: 'POST', file: 'api/links/reset-request/route.ts', why: 'the Forgot password form; answers the same for every address' },
  {
    method: 'POST',
    file: 'api/v1/projects/[project]/lock/verify/route.ts',
    why: 'pull API: the bearer project token is the authority (checked in the handler, tests/integration/pull-api.test.ts); the check changes nothing but the token-use record',
  },
];
