import type { DataSource } from 'typeorm';
import type { Config } from '../config';
import type { ApiRoute } from '../http/routes';
import { auditContext } from '../audit/audit';
import { readCaughtMail } from '../mail/read-caught-mail';

/** Development aid: what the local mail stand-in caught. Not found where the stand-in is not in use. */
export function mailRoutes({ config, dataSource }: { config: Config; dataSource: DataSource }): ApiRoute[] {
  return [
    {
      method: 'get',
      path: '/dev/caught-mail',
      access: 'admin:manage',
      summary: 'Mail caught by the local mail stand-in, newest first (development and tests only)',
      handlers: [
        async (req, res) => {
          res.json(await readCaughtMail(dataSource, config.mail.caughtMailUrl, auditContext(req)));
        },
      ],
    },
  ];
}
