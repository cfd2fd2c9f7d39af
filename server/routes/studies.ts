import type { Request } from 'express';
import type { DataSource } from 'typeorm';
import { analyzeStudy } from '../../shared/physiology';
import { createStudySchema, patchStudySchema } from '../../shared/study/schema';
import { toPhysiologyInput } from '../../shared/study/to-physiology';
import { worklistQuerySchema } from '../../shared/study/worklist';
import { auditContext, recordAudit } from '../audit/audit';
import { cleanFileName, detectMediaTypeOfFile, nameDisagreesWith, withExtension } from '../attachments/content-type';
import { acceptUpload, headOf, type StreamedFile } from '../attachments/upload';
import { neutraliseCsv } from '../../shared/csv/neutralise';
import type { AttachmentStorage } from '../attachments/storage';
import type { Config } from '../config';
import { HttpError, NotFoundError } from '../http/problem';
import type { ApiRoute } from '../http/routes';
import { parseOrThrow } from '../http/validate';
import { createStudy, loadStudy, lockEditableStudy, patchStudy, PatientMismatchError, StaleVersionError } from '../studies/repository';
import { worklistPageJson } from '../studies/worklist';
import { thresholdsInForce } from '../settings/thresholds';

const uuidPattern = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const idOf = (req: Request) => {
  const id = String(req.params.id);
  if (!uuidPattern.test(id)) throw new NotFoundError('No record has this id.');
  return id;
};

/** pg's unique-violation code: a client reused a row id that belongs elsewhere. */
const isUniqueViolation = (e: unknown) => (e as { code?: string })?.code === '23505';

export function studyRoutes({ config, dataSource, storage }: { config: Config; dataSource: DataSource; storage: AttachmentStorage }): ApiRoute[] {
  const upload = acceptUpload(storage, config.attachments.maxBytes, config.attachments.maxConcurrentUploads ?? 4);

  /** A study read by the signed-in user, recorded in the audit trail; 404 when there is none. */
  const readStudy = async (req: Request, view?: string) => {
    const study = await loadStudy(dataSource, idOf(req));
    if (!study) throw new NotFoundError('No study has this id.');
    await recordAudit(dataSource, { ...auditContext(req), action: 'read', entityType: 'study', entityId: study.id, outcome: 'success', ...(view ? { detail: { view } } : {}) });
    return study;
  };

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
          let id: string;
          try {
            id = await createStudy(dataSource, input, req.session.auth!.userId, auditContext(req));
          } catch (error) {
            if (error instanceof PatientMismatchError) {
              // Who tried which MRN against which differing fields: for the audit trail, not the answer.
              await recordAudit(dataSource, { ...auditContext(req), action: 'create', entityType: 'study', outcome: 'failure', detail: { reason: 'patient-mismatch', mrn: error.mrn, differs: error.fields } });
            }
            throw error;
          }
          res.status(201).location(`/api/studies/${id}`).json(await loadStudy(dataSource, id));
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
          res.json(await readStudy(req));
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
          try {
            const { record } = await patchStudy(dataSource, id, patch, auditContext(req));
            res.json(record);
          } catch (error) {
            if (error instanceof StaleVersionError) {
              await recordAudit(dataSource, { ...auditContext(req), action: 'update', entityType: 'study', entityId: id, outcome: 'failure', detail: { reason: 'stale-version', fromVersion: patch.version, current: error.current.version } });
              res.status(409).type('application/problem+json').send(
                JSON.stringify({
                  type: 'https://isobar.example/problems/stale-version',
                  title: error.title,
                  status: 409,
                  detail: error.message,
                  instance: req.originalUrl,
                  currentVersion: error.current.version,
                  current: error.current,
                }),
              );
              return;
            }
            if (error instanceof PatientMismatchError) {
              await recordAudit(dataSource, { ...auditContext(req), action: 'update', entityType: 'study', entityId: id, outcome: 'failure', detail: { reason: 'patient-mismatch', mrn: error.mrn, differs: error.fields } });
            }
            if (isUniqueViolation(error)) throw new HttpError(409, 'duplicate-row-id', 'Row id already used', 'A vessel or dose row id belongs to another study. Reload the study.');
            throw error;
          }
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
          const study = await readStudy(req, 'analysis');
          const { overrides } = await thresholdsInForce(dataSource);
          res.json({ version: study.version, analysis: analyzeStudy({ ...toPhysiologyInput(study), thresholds: overrides }) });
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
          const rows = await dataSource.query(`SELECT id, display_name FROM app_user WHERE role = 'physician' ORDER BY display_name, id`);
          res.json({ items: rows.map((r: { id: string; display_name: string }) => ({ id: r.id, displayName: r.display_name })) });
        },
      ],
    },
    {
      method: 'post',
      path: '/studies/:id/attachments',
      access: 'study:write',
      summary: 'Attach a console printout or export (PDF, PNG, JPEG, CSV; type checked from the content)',
      handlers: [
        upload,
        async (req, res) => {
          const id = idOf(req);
          const file = req.file as unknown as (StreamedFile & { originalname: string }) | undefined;
          if (!file) throw new HttpError(400, 'no-file', 'No file', 'Choose a file to attach.');
          // From here on the incoming file is ours to keep or to remove.
          let adopted = false;
          try {
            if (file.size === 0) throw new HttpError(400, 'no-file', 'No file', 'Choose a file to attach.');
            const given = cleanFileName(file.originalname);
            const mediaType = await detectMediaTypeOfFile(file.path, await headOf(file.path));
            const refused = !mediaType
              ? `"${given}" is not a PDF, PNG, JPEG or CSV file (judged from its content, not its name).`
              : nameDisagreesWith(given, mediaType)
                ? `"${given}" is named as another kind of file than its content (${mediaType}). Rename it or attach the right file.`
                : null;
            if (refused || !mediaType) {
              await recordAudit(dataSource, { ...auditContext(req), action: 'create', entityType: 'attachment', outcome: 'failure', detail: { studyId: id, fileName: given, reason: 'unsupported-type', detected: mediaType } });
              throw new HttpError(415, 'unsupported-file-type', 'File type not accepted', refused ?? undefined);
            }
            const fileName = withExtension(given, mediaType);
            const stored = await storage.adopt(file.path);
            adopted = true;
            let saved: { id: string; uploaded_at: Date };
            try {
              saved = await dataSource.transaction(async (db) => {
                await lockEditableStudy(db, id);
                const [row] = await db.query(
                  `INSERT INTO attachment (study_id, file_name, media_type, size_bytes, sha256, storage_key, uploaded_by)
                   VALUES ($1, $2, $3, $4, $5, $6, $7) RETURNING id, uploaded_at`,
                  [id, fileName, mediaType, file.size, file.sha256, stored.key, req.session.auth!.userId],
                );
                await recordAudit(db, { ...auditContext(req), action: 'create', entityType: 'attachment', entityId: row.id, outcome: 'success', detail: { studyId: id, fileName, sha256: file.sha256 } });
                return row as { id: string; uploaded_at: Date };
              });
            } catch (error) {
              // Nothing refers to the bytes when the row was not written.
              await storage.delete(stored.key).catch(() => undefined);
              throw error;
            }
            res.status(201).json({
              id: saved.id,
              fileName,
              mediaType,
              sizeBytes: file.size,
              sha256: file.sha256,
              uploadedAt: saved.uploaded_at.toISOString(),
              uploadedBy: req.session.auth!.displayName,
            });
          } finally {
            if (!adopted) await storage.discard(file.path).catch(() => undefined);
          }
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
          const [row] = await dataSource.query(`SELECT id, study_id, file_name, media_type, storage_key FROM attachment WHERE id = $1`, [idOf(req)]);
          if (!row) throw new NotFoundError('No attachment has this id.');
          const stored = await storage.get(row.storage_key);
          // The stored bytes (and their SHA-256) stay as uploaded; a CSV is served with every cell a
          // spreadsheet would run as a formula neutralised (shared/csv/neutralise.ts).
          const bytes = row.media_type === 'text/csv' ? Buffer.from(neutraliseCsv(stored.toString('utf8')), 'utf8') : stored;
          await recordAudit(dataSource, { ...auditContext(req), action: 'read', entityType: 'attachment', entityId: row.id, outcome: 'success', detail: { studyId: row.study_id } });
          res
            .type(row.media_type)
            .set('Content-Disposition', `attachment; filename="${row.file_name.replace(/[^\x20-\x7E]/g, '_')}"; filename*=UTF-8''${encodeURIComponent(row.file_name)}`)
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
          const attachmentId = idOf(req);
          const removed = await dataSource.transaction(async (db) => {
            const [row] = await db.query(`SELECT id, study_id, file_name, sha256, storage_key FROM attachment WHERE id = $1`, [attachmentId]);
            if (!row) throw new NotFoundError('No attachment has this id.');
            await lockEditableStudy(db, row.study_id);
            await db.query(`DELETE FROM attachment WHERE id = $1`, [row.id]);
            await recordAudit(db, { ...auditContext(req), action: 'delete', entityType: 'attachment', entityId: row.id, outcome: 'success', detail: { studyId: row.study_id, fileName: row.file_name, sha256: row.sha256 } });
            return row as { storage_key: string };
          });
          // The bytes go after the row is gone for good; a failure here leaves only an unreferenced file.
          await storage.delete(removed.storage_key).catch(() => undefined);
          res.status(204).end();
        },
      ],
    },
  ];
}
