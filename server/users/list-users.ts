import type { DataSource } from 'typeorm';
import type { UserList } from '../../shared/auth/users';
import { recordAudit, type AuditActor } from '../audit/audit';
import { User } from '../db/entities/user.entity';

/** Everyone who has an account, with their role, by name; the ids shown are recorded in the audit trail. */
export async function listUsers(dataSource: DataSource, actor: AuditActor): Promise<UserList> {
  const rows = await dataSource.manager.find(User, {
    select: { id: true, displayName: true, email: true, role: true, lastSignInAt: true },
    order: { displayName: 'ASC', id: 'ASC' },
  });
  await recordAudit(dataSource, { ...actor, action: 'search', entityType: 'user', outcome: 'success', detail: { returned: rows.length, userIds: rows.map((u) => u.id) } });
  return {
    items: rows.map((u) => ({
      id: u.id,
      displayName: u.displayName,
      email: u.email,
      role: u.role,
      lastSignInAt: u.lastSignInAt?.toISOString() ?? null,
    })),
  };
}
