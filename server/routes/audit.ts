import type { Request, Response } from 'express';
import type { DataSource } from 'typeorm';
import { auditExportQuerySchema, auditTrailQuerySchema, filtersUsed, type AuditExportFormat, type AuditFilters } from '../../shared/audit/trail';
import { auditContext } from '../audit/audit';
import { readAuditTrail } from '../audit/audit-trail';
import { exportAuditTrail } from '../audit/audit-export';
import type { Config } from '../config';
import type { ApiRoute } from '../http/routes';
import { parseOrThrow } from '../http/validate';

/**
 * The audit trail: searched by people (a page in words), exported as CSV or as FHIR R4 AuditEvent
 * resources. Viewing and exporting it are audited too, with the filters used.
 */
export function auditRoutes({ dataSource, config }: { dataSource: DataSource; config: Config }): ApiRoute[] {
  const exportTo = (format: AuditExportFormat, download: boolean) => async (req: Request, res: Response) => {
    const query = parseOrThrow(auditExportQuerySchema, { ...req.query, ...(download ? {} : { format }) }, 'The audit trail export');
    const filters: AuditFilters = query;
    const path = download ? '/api/audit-trail/export' : '/api/audit-events';
    const url = (cursor?: string) => {
      const params = new URLSearchParams({ ...(filtersUsed(filters) as Record<string, string>), ...(download ? { format: query.format } : {}), ...(query._count ? { _count: String(query._count) } : {}), ...(cursor ? { cursor } : {}) });
      return `${config.publicUrl}${path}?${params}`;
    };
    await exportAuditTrail(
      dataSource,
      {
        filters,
        format: query.format,
        cursor: query.cursor,
        count: query._count,
        selfUrl: url(query.cursor),
        nextUrl: (cursor) => url(cursor),
        fhir: { patientIdSystem: config.ehr.identifierSystems.patient },
      },
      auditContext(req),
      res,
      () => {
        const stamp = new Date().toISOString().slice(0, 10);
        if (query.format === 'csv') {
          res.type('text/csv; charset=utf-8');
          if (download) res.attachment(`audit-trail-${stamp}.csv`);
        } else {
          res.type('application/fhir+json; charset=utf-8');
          if (download) res.attachment(`audit-trail-${stamp}.json`);
        }
        res.setHeader('Cache-Control', 'no-store');
      },
    );
  };
  return [
    {
      method: 'get',
      path: '/audit-trail',
      access: 'audit:read',
      summary: 'Audit events newest first, keyset pages, filtered by user, patient, study, action, outcome and date range',
      handlers: [
        async (req, res) => {
          const query = parseOrThrow(auditTrailQuerySchema, req.query, 'The audit trail filter');
          res.json(await readAuditTrail(dataSource, query, query.cursor, query.limit, auditContext(req)));
        },
      ],
    },
    {
      method: 'get',
      path: '/audit-trail/export',
      access: 'audit:read',
      summary: 'The filtered audit trail as a download: CSV (every event) or FHIR R4 AuditEvent resources in a searchset Bundle (format=fhir)',
      handlers: [exportTo('csv', true)],
    },
    {
      method: 'get',
      path: '/audit-events',
      access: 'audit:read',
      summary: 'The filtered audit trail as FHIR R4 AuditEvent resources (a searchset Bundle with a next link)',
      handlers: [exportTo('fhir', false)],
    },
  ];
}
