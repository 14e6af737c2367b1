import type { Role } from '#shared/roles.ts';

export interface NavItem {
  to: string;
  label: string;
  /** Roles that see the item; omitted = every signed-in user. */
  roles?: Role[];
}

// The one list of places; a feature adds its entry here and its route in router.tsx.
export const NAV_ITEMS: NavItem[] = [
  { to: '/field', label: 'My spans', roles: ['surveyor'] },
  { to: '/spans', label: 'Spans' },
  { to: '/map', label: 'Map' },
  { to: '/lines', label: 'Lines' },
  { to: '/import', label: 'Import', roles: ['surveyor', 'admin'] },
  { to: '/review', label: 'Review desk', roles: ['safety'] },
  { to: '/planning', label: 'Planning', roles: ['planner'] },
  { to: '/missions', label: 'Missions', roles: ['planner', 'safety', 'admin'] },
  { to: '/admin', label: 'Admin', roles: ['admin'] },
  { to: '/admin/audit', label: 'Audit log', roles: ['admin', 'safety'] },
  { to: '/admin/outbox', label: 'Outbox', roles: ['admin'] },
  { to: '/admin/profiles', label: 'Profiles', roles: ['admin'] },
  { to: '/admin/scoring', label: 'Scoring', roles: ['admin'] },
  { to: '/evidence', label: 'Load evidence', roles: ['admin', 'safety', 'planner'] },
  { to: '/calculators', label: 'Calculators' },
  { to: '/account', label: 'Account' },
];

export function navFor(roles: readonly Role[]) {
  return NAV_ITEMS.filter((i) => !i.roles || i.roles.some((r) => roles.includes(r)));
}
