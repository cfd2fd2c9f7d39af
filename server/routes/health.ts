import { Router } from 'express';
import type { DataSource } from 'typeorm';
import { databaseAnswers } from '../db/data-source';
import { ServiceUnavailableError } from '../http/problem';

/** `GET /api/health`: 200 only when the database answers, so a load balancer can trust it. */
export function healthRouter(dataSource: DataSource): Router {
  const router = Router();
  router.get('/health', async (_req, res) => {
    if (!(await databaseAnswers(dataSource))) {
      throw new ServiceUnavailableError('The database is not answering.');
    }
    res.set('Cache-Control', 'no-store').json({ status: 'ok', database: 'up', time: new Date().toISOString() });
  });
  return router;
}
