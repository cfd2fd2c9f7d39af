import type { DataSource } from 'typeorm';
import type { ApiRoute } from '../http/routes';
import { thresholdsInForce } from '../settings/queries/thresholds';

/** The lab's settings that screens need to show the same judgements as the server. */
export function settingsRoutes({ dataSource }: { dataSource: DataSource }): ApiRoute[] {
  return [
    {
      method: 'get',
      path: '/settings/thresholds',
      access: 'study:read',
      summary: 'The thresholds in force: every value, the lab overrides, and since when',
      handlers: [
        async (_req, res) => {
          res.json(await thresholdsInForce(dataSource));
        },
      ],
    },
  ];
}
