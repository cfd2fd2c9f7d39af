import type { DataSource } from 'typeorm';
import { auditContext, recordAudit } from '../audit/audit';
import type { ApiRoute } from '../http/routes';
import { listAwaitingSignature } from '../studies/awaiting-signature';
import { awaitingSignature } from '../turnaround/awaiting-signature';
import { turnaroundSettings } from '../turnaround/settings';

/** Reads of studies awaiting signature, overdue studies and users. Every read is audited. */
export function recordRoutes({ dataSource }: { dataSource: DataSource }): ApiRoute[] {
  return [
    {
      method: 'get',
      path: '/awaiting-signature',
      access: 'study:read',
      summary: 'Studies awaiting signature, oldest first: those you operated, and all of them',
      handlers: [
        async (req, res) => {
          const result = await listAwaitingSignature(dataSource, req.session.auth!.userId);
          const studyIds = [...new Set([...result.mine.items, ...result.all.items].map((s) => s.id))];
          await recordAudit(dataSource, { ...auditContext(req), action: 'search', entityType: 'study', outcome: 'success', detail: { view: 'awaiting-my-signature', returned: studyIds.length, studyIds } });
          res.json(result);
        },
      ],
    },
    {
      method: 'get',
      path: '/turnaround/awaiting-signature',
      access: 'turnaround:read',
      summary: 'Studies not yet signed, longest waiting first, with their age and owner against the signature target',
      handlers: [
        async (req, res) => {
          const waiting = await awaitingSignature(dataSource, await turnaroundSettings(dataSource));
          await recordAudit(dataSource, { ...auditContext(req), action: 'search', entityType: 'study', outcome: 'success', detail: { view: 'awaiting-signature', returned: waiting.items.length, studyIds: waiting.items.map((s) => s.id) } });
          res.json(waiting);
        },
      ],
    },
    {
      method: 'get',
      path: '/admin/users',
      access: 'admin:manage',
      summary: 'Everyone who has an account, with their role',
      handlers: [
        async (req, res) => {
          const rows = await dataSource.query(
            `SELECT id, display_name, email, role, last_sign_in_at FROM app_user ORDER BY display_name, id`,
          );
          await recordAudit(dataSource, { ...auditContext(req), action: 'search', entityType: 'user', outcome: 'success', detail: { returned: rows.length, userIds: rows.map((u: { id: string }) => u.id) } });
          res.json({
            items: rows.map((u: { id: string; display_name: string; email: string; role: string | null; last_sign_in_at: Date | null }) => ({
              id: u.id,
              displayName: u.display_name,
              email: u.email,
              role: u.role,
              lastSignInAt: u.last_sign_in_at?.toISOString() ?? null,
            })),
          });
        },
      ],
    },
  ];
}
