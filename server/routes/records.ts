import type { DataSource } from 'typeorm';
import { auditContext, recordAudit } from '../audit/audit';
import type { ApiRoute } from '../http/routes';
import { defaultSignatureTargetHours, waitingSince } from '../../shared/turnaround/overdue';
import { summarySelect, toSummary } from '../studies/worklist';
import { listAwaitingSignature } from '../studies/awaiting-signature';

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
      summary: 'Studies not yet signed, with hours since the procedure ended against the target',
      handlers: [
        async (req, res) => {
          const now = new Date();
          const rows: Record<string, never>[] = await dataSource.query(
            `${summarySelect} WHERE s.state IN ('draft', 'awaiting-signature') AND s.procedure_ended_at IS NOT NULL
             ORDER BY s.procedure_ended_at ASC, s.id LIMIT 200`,
          );
          await recordAudit(dataSource, { ...auditContext(req), action: 'search', entityType: 'study', outcome: 'success', detail: { view: 'awaiting-signature', returned: rows.length, studyIds: rows.map((r) => r.id) } });
          res.json({
            targetHours: defaultSignatureTargetHours,
            items: rows.map((row) => ({ ...toSummary(row), ...waitingSince(row.procedure_ended_at as Date, now) })),
          });
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
