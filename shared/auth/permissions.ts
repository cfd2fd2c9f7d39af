/**
 * Who may do what: the one table the server enforces on every route and the client reads
 * to hide what a role cannot do. Roles arrive from the identity provider (see server/config.ts).
 */
export const roles = ['staff', 'physician', 'coder', 'chief', 'admin'] as const;
export type Role = (typeof roles)[number];

export const permissionTable = {
  /** Worklist, study records and the patient details on them. */
  'study:read': ['staff', 'physician', 'coder', 'chief'],
  'study:write': ['staff', 'physician'],
  'study:sign': ['physician'],
  /** The coding queue and code suggestions. */
  'coding:read': ['coder', 'chief'],
  'coding:review': ['coder'],
  /** Turnaround and quality figures. */
  'turnaround:read': ['chief'],
  /** The audit trail. */
  'audit:read': ['chief', 'admin'],
  /** The list of EHR deliveries needing attention, and sending a signed report again. */
  'delivery:manage': ['chief', 'admin'],
  /** Users, roles, templates, settings. */
  'admin:manage': ['admin'],
} as const satisfies Record<string, readonly Role[]>;

export type Permission = keyof typeof permissionTable;
const permissions = Object.keys(permissionTable) as Permission[];

export function can(role: Role | null | undefined, permission: Permission): boolean {
  return !!role && (permissionTable[permission] as readonly Role[]).includes(role);
}

export function permissionsOf(role: Role | null | undefined): Permission[] {
  return permissions.filter((p) => can(role, p));
}

/** The page each role lands on after signing in. */
export const homeOf: Record<Role, string> = {
  staff: '/',
  physician: '/',
  coder: '/coding',
  chief: '/turnaround',
  admin: '/admin',
};

export const roleLabel: Record<Role, string> = {
  staff: 'Lab staff',
  physician: 'Physician',
  coder: 'Coder',
  chief: 'Department chief',
  admin: 'Administrator',
};

export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (roles as readonly string[]).includes(value);
}
