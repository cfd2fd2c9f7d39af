import type { DataSource } from 'typeorm';
import { toFhirAuditEvent } from '../../fhir/audit-event';
import { auditContext, recordAudit, type AuditRow } from '../audit/audit';
import type { ApiRoute } from '../http/routes';
import { defaultSignatureTargetHours, waitingSince } from '../../shared/turnaround/overdue';
import { summarySelect, toSummary } from '../studies/worklist';

/** Reads of overdue studies, users and the audit trail. Every read is audited. */
export function recordRoutes({ dataSource }: { dataSource: DataSource }): ApiRoute[] {
  return [
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
          await recordAudit(dataSource, { ...auditContext(req), action: 'search', entityType: 'study', outcome: 'success', detail: { view: 'awaiting-signature', returned: rows.length } });
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
          await recordAudit(dataSource, { ...auditContext(req), action: 'search', entityType: 'user', outcome: 'success', detail: { returned: rows.length } });
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
    {
      method: 'get',
      path: '/audit-events',
      access: 'audit:read',
      summary: 'The newest audit events as FHIR R4 AuditEvent resources (a searchset Bundle)',
      handlers: [
        async (req, res) => {
          const limit = Math.min(500, Math.max(1, Number(req.query.limit) || 100));
          const rows: AuditRow[] = await dataSource.query(
            `SELECT id::text, recorded_at, actor_user_id, actor_name, actor_role, action, entity_type, entity_id, client_address, outcome, detail
             FROM audit_event ORDER BY id DESC LIMIT $1`,
            [limit],
          );
          await recordAudit(dataSource, { ...auditContext(req), action: 'export', entityType: 'audit-event', outcome: 'success', detail: { returned: rows.length } });
          res.json({
            resourceType: 'Bundle',
            type: 'searchset',
            total: rows.length,
            entry: rows.map((r) => ({
              resource: toFhirAuditEvent({
                id: r.id,
                recordedAt: r.recorded_at,
                actorUserId: r.actor_user_id,
                actorName: r.actor_name,
                actorRole: r.actor_role,
                action: r.action,
                entityType: r.entity_type,
                entityId: r.entity_id,
                clientAddress: r.client_address,
                outcome: r.outcome,
              }),
            })),
          });
        },
      ],
    },
  ];
}
