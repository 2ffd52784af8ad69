// The four roles (DEVELOPERS.md, Conventions, "Roles"). Roles are explicit sets, not a ladder: each guard names every role it
// admits. An admin manages people and mail and is not thereby a reviewer; a reviewer does not upload.
// A later feature that wants "engineer or reviewer" says so at its guard.

export const ROLES = ['viewer', 'engineer', 'reviewer', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  viewer: 'Viewer',
  engineer: 'Engineer',
  reviewer: 'Reviewer',
  admin: 'Admin',
};

export const ROLE_DUTIES: Record<Role, string> = {
  viewer: 'reads the shelf and downloads approved reduced models',
  engineer: 'uploads source models, runs reductions and registers drafts',
  reviewer: 'approves reduced models or sends them back for revision, never their own',
  admin: 'manages people, roles and the captured mail',
};

export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (ROLES as readonly string[]).includes(value);
}

export function roleAdmits(allowed: readonly Role[], role: Role): boolean {
  return allowed.includes(role);
}
