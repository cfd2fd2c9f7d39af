import type { Request } from 'express';
import type { DataSource } from 'typeorm';
import { createStudySchema, patchStudySchema } from '../../shared/study/schema';
import { worklistQuerySchema } from '../../shared/study/worklist';
import { auditContext } from '../audit/audit';
import { attachFile } from '../attachments/attach-file';
import { readAttachment } from '../attachments/read-attachment';
import { removeAttachment } from '../attachments/remove-attachment';
import type { AttachmentStorage, StreamedFile } from '../attachments/storage';
import type { Config } from '../config';
import type { ApiRoute } from '../http/routes';
import { acceptUpload } from '../http/upload';
import { parseOrThrow, uuidParam } from '../http/validate';
import { analyseStudy } from '../studies/analyse-study';
import { editStudy } from '../studies/edit-study';
import { listOperators } from '../studies/operators';
import { openStudy } from '../studies/open-study';
import { readAwaitingSignature } from '../studies/read-awaiting-signature';
import { readStudy } from '../studies/read-study';
import { worklistPageJson } from '../studies/worklist';

const idOf = (req: Request) => uuidParam(req);

export function studyRoutes({ config, dataSource, storage }: { config: Config; dataSource: DataSource; storage: AttachmentStorage }): ApiRoute[] {
  const upload = acceptUpload(storage, config.attachments.maxBytes, config.attachments.maxConcurrentUploads ?? 4);

  return [
    {
      method: 'get',
      path: '/studies',
      access: 'study:read',
      summary: 'Worklist: filters (state, search, operator, dates) and keyset pages',
      handlers: [
        async (req, res) => {
          const query = parseOrThrow(worklistQuerySchema, req.query, 'The worklist query');
          // Audited in the same statement: the filters and the ids shown, so "who saw this patient"
          // has an answer, not only the filters used.
          res.type('application/json').send(await worklistPageJson(dataSource, query, auditContext(req)));
        },
      ],
    },
    {
      method: 'post',
      path: '/studies',
      access: 'study:write',
      summary: 'Open a new study for a patient',
      handlers: [
        async (req, res) => {
          const input = parseOrThrow(createStudySchema, req.body, 'The new study');
          const study = await openStudy(dataSource, input, req.session.auth!.userId, auditContext(req));
          res.status(201).location(`/api/studies/${study.id}`).json(study);
        },
      ],
    },
    {
      method: 'get',
      path: '/studies/:id',
      access: 'study:read',
      summary: 'One study: every section, its attachments and its version',
      handlers: [
        async (req, res) => {
          res.json(await readStudy(dataSource, idOf(req), auditContext(req)));
        },
      ],
    },
    {
      method: 'patch',
      path: '/studies/:id',
      access: 'study:write',
      summary: 'Replace whole sections of a draft, naming the version it was read at (stale → 409)',
      handlers: [
        async (req, res) => {
          const id = idOf(req);
          const patch = parseOrThrow(patchStudySchema, req.body, 'The change');
          res.json(await editStudy(dataSource, id, patch, auditContext(req)));
        },
      ],
    },
    {
      method: 'get',
      path: '/studies/:id/analysis',
      access: 'study:read',
      summary: 'The authoritative indices, flags, warnings and endotype of the stored measurements',
      handlers: [
        async (req, res) => {
          res.json(await analyseStudy(dataSource, idOf(req), auditContext(req)));
        },
      ],
    },
    {
      method: 'get',
      path: '/operators',
      access: 'study:read',
      summary: 'Physicians who can be named as operator',
      handlers: [
        async (_req, res) => {
          res.json(await listOperators(dataSource));
        },
      ],
    },
    {
      method: 'post',
      path: '/studies/:id/attachments',
      access: 'study:write',
      summary: 'Attach a console printout or export (PDF, PNG, JPEG, CSV; type checked from the content)',
      handlers: [
        // A path that names no study is refused before any byte is stored.
        (req, _res, next) => {
          idOf(req);
          next();
        },
        upload,
        async (req, res) => {
          const id = idOf(req);
          const file = req.file as unknown as (StreamedFile & { originalname: string }) | undefined;
          const attached = await attachFile(dataSource, storage, { studyId: id, file, uploadedBy: req.session.auth!.userId, actor: auditContext(req) });
          res.status(201).json({ ...attached, uploadedBy: req.session.auth!.displayName });
        },
      ],
    },
    {
      method: 'get',
      path: '/attachments/:id/content',
      access: 'study:read',
      summary: 'Download an attachment',
      handlers: [
        async (req, res) => {
          const { fileName, mediaType, bytes } = await readAttachment(dataSource, storage, idOf(req), auditContext(req));
          res
            .type(mediaType)
            .set('Content-Disposition', `attachment; filename="${fileName.replace(/[^\x20-\x7E]/g, '_')}"; filename*=UTF-8''${encodeURIComponent(fileName)}`)
            .set('X-Content-Type-Options', 'nosniff')
            .send(bytes);
        },
      ],
    },
    {
      method: 'delete',
      path: '/attachments/:id',
      access: 'study:write',
      summary: 'Remove an attachment (recorded in the audit trail with its name and checksum)',
      handlers: [
        async (req, res) => {
          await removeAttachment(dataSource, storage, idOf(req), auditContext(req));
          res.status(204).end();
        },
      ],
    },
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
  ];
}
