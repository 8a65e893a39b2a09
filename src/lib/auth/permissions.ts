/**
 * Who may do what in Quayside. This table is the single source of truth for authorisation:
 * every API route names one action from it and the server refuses anything else.
 * Pure data and functions: safe to import from the server, tests and (for hiding buttons)
 * islands — the server still checks every request.
 */

export const roles = ['admin', 'engineer', 'coordinator', 'distributor'] as const;
export type Role = (typeof roles)[number];

export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (roles as readonly string[]).includes(value);
}

/** Actions, named `<object>:<verb>`. PRODUCT.md, "Roles and permissions". */
export const permissions = {
  'release:list': ['admin', 'engineer', 'coordinator', 'distributor'],
  'release:read': ['admin', 'engineer', 'coordinator', 'distributor'],
  'audio:upload': ['admin', 'engineer'],
  'order:edit': ['admin', 'engineer'],
  'check:run': ['admin', 'engineer', 'coordinator'],
  'finding:read': ['admin', 'engineer', 'coordinator'],
  'metadata:edit': ['admin', 'coordinator'],
  'waiver:audio': ['admin', 'engineer'],
  'waiver:metadata': ['admin', 'coordinator'],
  'audio:signoff': ['admin', 'engineer'],
  'release:approve': ['admin', 'coordinator'],
  'release:reopen': ['admin', 'coordinator'],
  'release:share': ['admin', 'coordinator'],
  'package:download': ['admin', 'distributor'],
  'package:acknowledge': ['admin', 'distributor'],
  'member:manage': ['admin'],
  'profile:manage': ['admin'],
  'registrant:manage': ['admin'],
  'audit:read': ['admin', 'engineer', 'coordinator'],
  'mail:read': ['admin'],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof permissions;

/** True when `role` may perform `action`. Unknown roles and unknown actions are refused. */
export function can(role: string | null | undefined, action: string): boolean {
  if (!isRole(role)) return false;
  if (!Object.hasOwn(permissions, action)) return false;
  const allowed: readonly Role[] = permissions[action as Permission];
  return allowed.includes(role);
}

/**
 * Distributors see only the releases shared with them; every other member sees all of the
 * organisation's releases.
 */
export function seesOnlySharedReleases(role: Role): boolean {
  return role === 'distributor';
}

export const roleLabels: Record<Role, string> = {
  admin: 'Admin',
  engineer: 'Engineer',
  coordinator: 'Coordinator',
  distributor: 'Distributor',
};
