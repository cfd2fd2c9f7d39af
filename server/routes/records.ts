import type { DataSource } from 'typeorm';
import { auditContext } from '../audit/audit';
import type { ApiRoute } from '../http/routes';
import { readAwaitingSignature } from '../studies/read-awaiting-signature';
import { listUsers } from '../users/list-users';
import { readUnsignedStudies } from '../turnaround/read-turnaround';

/** Reads of studies awaiting signature, overdue studies and users. Every read is audited. */
export function recordRoutes({ dataSource }: { dataSource: DataSource }): ApiRoute[] {
  return [
    {
      method: 'get',
      path: '/awaiting-signature',
      access: 'study:read',
      summary: 'Studies awaiting signature, oldest first: those you operated, and all of them',
      handlers: [
        async (req, res) => {
          res.json(await readAwaitingSignature(dataSource, req.session.auth!.userId, auditContext(req)));
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
    {
      method: 'get',
      path: '/admin/users',
      access: 'admin:manage',
      summary: 'Everyone who has an account, with their role',
      handlers: [
        async (req, res) => {
          res.json(await listUsers(dataSource, auditContext(req)));
        },
      ],
    },
  ];
}
