/** The four roles, least to most privileged. Each role may do everything the roles before it may. */
export const ROLES = ['viewer', 'technician', 'reviewer', 'admin'] as const;
export type Role = (typeof ROLES)[number];

/** True when `role` ranks at or above `minimum` in ROLES. */
export function roleAtLeast(role: Role, minimum: Role): boolean {
  return ROLES.indexOf(role) >= ROLES.indexOf(minimum);
}

export const ROLE_LABELS: Record<Role, string> = {
  viewer: 'Viewer',
  technician: 'Technician',
  reviewer: 'Reviewer',
  admin: 'Admin',
};
