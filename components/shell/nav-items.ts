// The shelf's sections, in the order of the work: a source model comes in, is reduced, reviewed, and
// pulled by a controller project. Numbered like the sheets of a drawing set.
import type { Role } from '@/lib/roles';

export interface NavItem {
  href: string;
  label: string;
  sheet: string;
  /** Roles that see the entry; absent means every role. */
  roles?: readonly Role[];
}

export const NAV_ITEMS: readonly NavItem[] = [
  { href: '/', label: 'Dashboard', sheet: '01' },
  { href: '/source-models', label: 'Source models', sheet: '02' },
  { href: '/reduced-models', label: 'Reduced models', sheet: '03' },
  { href: '/reviews', label: 'Reviews', sheet: '04' },
  { href: '/projects', label: 'Controller projects', sheet: '05' },
  { href: '/admin/people', label: 'Admin', sheet: '06', roles: ['admin'] },
];

export function navItemsFor(role: Role): NavItem[] {
  return NAV_ITEMS.filter((item) => !item.roles || item.roles.includes(role));
}
