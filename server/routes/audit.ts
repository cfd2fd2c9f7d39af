import type { DataSource } from 'typeorm';
import { toFhirAuditEvent } from '../../fhir/audit-event';
import { auditTrailQuerySchema } from '../../shared/audit/trail';
import { auditContext, recordAudit, type AuditRow } from '../audit/audit';
import { readAuditTrail } from '../audit/audit-trail';
import type { ApiRoute } from '../http/routes';
import { parseOrThrow } from '../http/validate';

/** The audit trail: for people (filtered, in words) and as FHIR AuditEvent resources. Reading it is audited too. */
export function auditRoutes({ dataSource }: { dataSource: DataSource }): ApiRoute[] {
  return [
    {
      method: 'get',
      path: '/audit-trail',
      access: 'audit:read',
      summary: 'Audit events newest first, keyset pages, filtered by user, patient, action and date',
      handlers: [
        async (req, res) => {
          const query = parseOrThrow(auditTrailQuerySchema, req.query, 'The audit trail filter');
          const page = await readAuditTrail(dataSource, query);
          await recordAudit(dataSource, {
            ...auditContext(req),
            action: 'search',
            entityType: 'audit-event',
            outcome: 'success',
            detail: { returned: page.items.length, filters: { ...query, limit: undefined, before: undefined } },
          });
          res.json(page);
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
            `SELECT a.id::text AS id, recorded_at, actor_user_id, actor_name, actor_role, action, entity_type, entity_id, client_address, outcome, detail
             FROM audit_event a ORDER BY a.id DESC LIMIT $1`,
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
