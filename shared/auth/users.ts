import type { Permission, Role } from './permissions';

/** GET /api/me: the signed-in user, their role and what it permits. */
export interface Me {
  id: string;
  displayName: string;
  email: string;
  role: Role | null;
  permissions: Permission[];
  /** The role's home page; null without a role. */
  home: string | null;
  /** When the session ends at the latest (its absolute limit), ISO 8601. */
  sessionExpiresAt: string;
}

/** One person with an account, as the admin page lists them. `role` is null until the identity provider grants one. */
export interface UserSummary {
  id: string;
  displayName: string;
  email: string;
  role: Role | null;
  lastSignInAt: string | null;
}

/** GET /api/admin/users: everyone who has an account, by name. */
export interface UserList {
  items: UserSummary[];
}
