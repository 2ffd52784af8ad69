import { describe, expect, it } from 'vitest';
import { isRole, roleAdmits, ROLES } from '@/lib/roles';
import { navItemsFor } from '@/components/shell/nav-items';

describe('roles', () => {
  it('are exactly the four: viewer, engineer, reviewer, admin', () => {
    expect(ROLES).toEqual(['viewer', 'engineer', 'reviewer', 'admin']);
    expect(isRole('admin')).toBe(true);
    expect(isRole('superuser')).toBe(false);
    expect(isRole(undefined)).toBe(false);
  });

  it('form explicit sets, not a ladder: admin is not admitted where only reviewers are', () => {
    expect(roleAdmits(['reviewer'], 'admin')).toBe(false);
    expect(roleAdmits(['engineer', 'reviewer'], 'reviewer')).toBe(true);
  });

  it('show the Admin section to admins only', () => {
    for (const role of ROLES) {
      const labels = navItemsFor(role).map((i) => i.label);
      expect(labels.slice(0, 5)).toEqual(['Dashboard', 'Source models', 'Reduced models', 'Reviews', 'Controller projects']);
      expect(labels.includes('Admin')).toBe(role === 'admin');
    }
  });
});
