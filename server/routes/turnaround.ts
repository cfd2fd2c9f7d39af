import type { DataSource } from 'typeorm';
import { auditContext, recordAudit } from '../audit/audit';
import type { ApiRoute } from '../http/routes';
import { parseOrThrow } from '../http/validate';
import { turnaroundQuerySchema } from '../../shared/turnaround/query';
import { turnaroundFigures } from '../turnaround/figures';
import { writeTurnaroundCsv } from '../turnaround/export';
import { labSettings } from '../settings/lab-settings';

/** The chief's turnaround and quality figures for a range of days, and their export. */
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
          const settings = await labSettings(dataSource);
          // The request is recorded by the statement that counts the range (`studies` is added there).
          const figures = await turnaroundFigures(dataSource, query, settings, new Date(), {
            ...auditContext(req),
            action: 'search',
            entityType: 'study',
            outcome: 'success',
            detail: { view: 'turnaround-figures', from: query.from, to: query.to },
          });
          res.json(figures);
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
          const settings = await labSettings(dataSource);
          await recordAudit(dataSource, { ...auditContext(req), action: 'export', entityType: 'study', outcome: 'success', detail: { view: 'turnaround', from: query.from, to: query.to } });
          res.type('text/csv; charset=utf-8').attachment(`turnaround-${query.from}-${query.to}.csv`);
          await writeTurnaroundCsv(dataSource, query, settings, res);
        },
      ],
    },
  ];
}
