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
];
