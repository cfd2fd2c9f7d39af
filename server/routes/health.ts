import type { DataSource } from 'typeorm';
import type { Health } from '../../shared/health';
import { databaseAnswers } from '../db/data-source';
import { ServiceUnavailableError } from '../http/problem';
import type { ApiRoute } from '../http/routes';

/** `GET /api/health`: 200 only when the database answers, so a load balancer can trust it. */
export function healthRoutes({ dataSource }: { dataSource: DataSource }): ApiRoute[] {
  return [
    {
      method: 'get',
      path: '/health',
      access: 'public',
      summary: 'Liveness with the database',
      handlers: [
        async (_req, res) => {
          if (!(await databaseAnswers(dataSource))) {
            throw new ServiceUnavailableError('The database is not answering.', { database: 'down' });
          }
          const health: Health = { status: 'ok', database: 'up', time: new Date().toISOString() };
          res.json(health);
        },
      ],
    },
  ];
}
