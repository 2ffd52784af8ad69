// Who is asking, and may they? Every guard re-reads the account from the database, so a role change or a
// deactivation takes effect on the next request, not when the session cookie expires.
//
//   requireRole(...roles)      route handlers: throws ApiError 401/403, which lib/http.ts `route()` answers
//   requirePageRole(...roles)  server components: redirects to /signin, or renders app/forbidden.tsx (403)
//   currentUser()              either: the signed-in, active account, or null
//
// Roles are explicit sets (lib/roles.ts): name every role a guard admits, e.g. requireRole('admin').
import { cache } from 'react';
import { getServerSession } from 'next-auth';
import { forbidden as renderForbidden, redirect } from 'next/navigation';
import { authOptions } from '@/lib/auth/options';
import { findUserById } from '@/lib/people';
import { forbidden, unauthenticated } from '@/lib/http';
import { ROLES, type Role } from '@/lib/roles';

export interface SessionUser {
  id: string;
  email: string;
  name: string;
  role: Role;
}

export const currentUser = cache(async (): Promise<SessionUser | null> => {
  const session = await getServerSession(authOptions);
  const id = session?.user?.id;
  if (!id) return null;
  const row = await findUserById(id).catch(() => undefined);
  if (!row || !row.active) return null;
  return { id: row.id, email: row.email, name: row.name, role: row.role };
});

function admittedRoles(roles: Role[]): readonly Role[] {
  return roles.length === 0 ? ROLES : roles;
}

/** For route handlers. With no roles given, any signed-in, active account passes. */
export async function requireRole(...roles: Role[]): Promise<SessionUser> {
  const user = await currentUser();
  if (!user) throw unauthenticated();
  if (!admittedRoles(roles).includes(user.role)) {
    throw forbidden(`this action (it needs the ${roles.join(' or ')} role)`);
  }
  return user;
}

/** For pages and layouts. With no roles given, any signed-in, active account passes. */
export async function requirePageRole(...roles: Role[]): Promise<SessionUser> {
  const user = await currentUser();
  if (!user) redirect('/signin');
  if (!admittedRoles(roles).includes(user.role)) renderForbidden();
  return user;
}
