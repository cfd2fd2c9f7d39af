import type { DataSource } from 'typeorm';
import { auditContext } from '../audit/audit';
import type { ApiRoute } from '../http/routes';
import { parseOrThrow } from '../http/validate';
import { turnaroundQuerySchema } from '../../shared/turnaround/query';
import { exportTurnaround, readTurnaroundFigures, readUnsignedStudies } from '../turnaround/read-turnaround';

/** The chief's turnaround and quality figures for a range of days, their export, and the studies not yet signed. */
export function turnaroundRoutes({ dataSource }: { dataSource: DataSource }): ApiRoute[] {
  return [
    {
      method: 'get',
      path: '/turnaround/figures',
      access: 'turnaround:read',
      summary: 'Median and 90th percentile turnaround per ISO week and per physician, and quality figures, for a range of days',
      handlers: [
        async (req, res) => {
          const query = parseOrThrow(turnaroundQuerySchema, req.query, 'The turnaround range');
          res.json(await readTurnaroundFigures(dataSource, query, auditContext(req)));
        },
      ],
    },
    {
      method: 'get',
      path: '/turnaround/export',
      access: 'turnaround:read',
      summary: 'Every study of a range of days with its steps and intervals, as CSV',
      handlers: [
        async (req, res) => {
          const query = parseOrThrow(turnaroundQuerySchema, req.query, 'The turnaround range');
          await exportTurnaround(dataSource, query, auditContext(req), res, () => res.type('text/csv; charset=utf-8').attachment(`turnaround-${query.from}-${query.to}.csv`));
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
          res.json(await readUnsignedStudies(dataSource, auditContext(req)));
        },
      ],
    },
  ];
}
