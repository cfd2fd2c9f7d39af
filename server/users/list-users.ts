import type { DataSource } from 'typeorm';
import { recordAudit } from '../audit/audit';
import type { AuditActor } from '../studies/repository';

export interface UserListItem {
  id: string;
  displayName: string;
  email: string;
  role: string | null;
  lastSignInAt: string | null;
}

/** Everyone who has an account, with their role, by name; the ids shown are recorded in the audit trail. */
export async function listUsers(dataSource: DataSource, actor: AuditActor): Promise<{ items: UserListItem[] }> {
  const rows: Array<{ id: string; display_name: string; email: string; role: string | null; last_sign_in_at: Date | null }> = await dataSource.query(
    `SELECT id, display_name, email, role, last_sign_in_at FROM app_user ORDER BY display_name, id`,
  );
  await recordAudit(dataSource, { ...actor, action: 'search', entityType: 'user', outcome: 'success', detail: { returned: rows.length, userIds: rows.map((u) => u.id) } });
  return {
    items: rows.map((u) => ({
      id: u.id,
      displayName: u.display_name,
      email: u.email,
      role: u.role,
      lastSignInAt: u.last_sign_in_at?.toISOString() ?? null,
    })),
  };
}
