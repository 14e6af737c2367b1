// The four roles a Roostline user can hold (one or more each).
export const ROLES = ['admin', 'safety', 'planner', 'surveyor'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Operations admin',
  safety: 'Safety officer',
  planner: 'Mission planner',
  surveyor: 'Field surveyor',
};

// Where each role lands after sign-in; the first role in this order wins for multi-role users.
export const ROLE_HOME: Record<Role, string> = {
  surveyor: '/field',
  safety: '/review',
  planner: '/planning',
  admin: '/admin',
};
export const HOME_PRIORITY: Role[] = ['surveyor', 'safety', 'planner', 'admin'];

export function homeFor(roles: readonly Role[]): string {
  const first = HOME_PRIORITY.find((r) => roles.includes(r));
  return first ? ROLE_HOME[first] : '/account';
}
