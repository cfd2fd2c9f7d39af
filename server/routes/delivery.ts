import type { Request } from 'express';
import type { DataSource } from 'typeorm';
import { z } from 'zod';
import { deliveryStatuses } from '../../shared/delivery/status';
import { auditContext } from '../audit/audit';
import type { ApiRoute } from '../http/routes';
import { parseOrThrow, uuidParam } from '../http/validate';
import { searchDeliveries } from '../ehr/search-deliveries';
import { readStudyDeliveries } from '../ehr/read-study-deliveries';
import { requestResend } from '../ehr/request-resend';

const idOf = (req: Request) => uuidParam(req);

const listQuerySchema = z.object({
  status: z.enum(deliveryStatuses, { error: `status must be one of: ${deliveryStatuses.join(', ')}.` }).optional(),
});

/** Delivery of signed reports to the EHR: per study for its readers; the list and "send again" for the chief and admin. */
export function deliveryRoutes({ dataSource }: { dataSource: DataSource }): ApiRoute[] {
  return [
    {
      method: 'get',
      path: '/studies/:id/deliveries',
      access: 'study:read',
      summary: 'EHR delivery of each signed version of a study: status, EHR ids, next try, issues',
      handlers: [
        async (req, res) => {
          const id = idOf(req);
          res.json({ items: await readStudyDeliveries(dataSource, id, auditContext(req)) });
        },
      ],
    },
    {
      method: 'get',
      path: '/deliveries',
      access: 'delivery:manage',
      summary: 'Deliveries that are retrying, rejected or given up: accession, status and issues only',
      handlers: [
        async (req, res) => {
          const query = parseOrThrow(listQuerySchema, req.query);
          res.json({ items: await searchDeliveries(dataSource, query.status ? [query.status] : undefined, auditContext(req)) });
        },
      ],
    },
    {
      method: 'post',
      path: '/report-versions/:id/resend',
      access: 'delivery:manage',
      summary: 'Send a signed report version to the EHR again (the EHR recognises the resend)',
      handlers: [
        async (req, res) => {
          const id = idOf(req);
          await requestResend(dataSource, id, auditContext(req));
          res.status(202).json({ reportVersionId: id, status: 'queued' });
        },
      ],
    },
  ];
}
