import { homeFor, type Role } from '#shared/roles.ts';

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
];

/** How many entries stay in the bar at tablet width (820 px) and on a wide screen (≥ 1280 px); the rest go under "More". */
export const INLINE_TABLET = 4;
export const INLINE_WIDE = 8;

/** The role's places, its own home first, then Spans and Map, then the rest in list order. */
export function navFor(roles: readonly Role[]) {
  const mine = NAV_ITEMS.filter((i) => !i.roles || i.roles.some((r) => roles.includes(r)));
  const home = homeFor(roles);
  const rank = (i: NavItem) => (i.to === home ? 0 : i.to === '/spans' ? 1 : i.to === '/map' ? 2 : 3);
  return mine.map((item, index) => ({ item, index })).sort((a, b) => rank(a.item) - rank(b.item) || a.index - b.index).map((x) => x.item);
}
