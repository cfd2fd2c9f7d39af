import fs from 'node:fs';
import type { DataSource } from 'typeorm';
import type { AttachmentSummary } from '../../shared/study/schema';
import { Attachment } from '../db/entities/measurement.entities';
import { recordAudit, type AuditActor } from '../audit/audit';
import { lockEditableStudy } from '../studies/repository';
import { cleanFileName, detectMediaTypeOfFile, nameDisagreesWith, withExtension } from './content-type';
import { NoFileError, UnsupportedFileTypeError } from './errors';
import type { AttachmentStorage, StreamedFile } from './storage';

/** The attachment as lists show it; the route adds who uploaded it. */
export type AttachedFile = Omit<AttachmentSummary, 'uploadedBy'>;

/**
 * Attaches an uploaded file (already streamed to the store's incoming folder and hashed) to an
 * editable study: the type is judged from the content, the name must not claim another kind, the
 * bytes are adopted into the store and the row and its audit event written in one transaction. A
 * refused file is recorded in the audit trail. Whatever happens, the incoming file does not stay
 * behind, and bytes whose row was not written are removed.
 */
export async function attachFile(
  dataSource: DataSource,
  storage: AttachmentStorage,
  { studyId, file, uploadedBy, actor }: { studyId: string; file: (StreamedFile & { originalname: string }) | undefined; uploadedBy: string; actor: AuditActor },
): Promise<AttachedFile> {
  if (!file) throw new NoFileError();
  // From here on the incoming file is ours to keep or to remove.
  let adopted = false;
  try {
    if (file.size === 0) throw new NoFileError();
    const given = cleanFileName(file.originalname);
    const mediaType = await detectMediaTypeOfFile(file.path, await headOf(file.path));
    const refused = !mediaType
      ? `"${given}" is not a PDF, PNG, JPEG or CSV file (judged from its content, not its name).`
      : nameDisagreesWith(given, mediaType)
        ? `"${given}" is named as another kind of file than its content (${mediaType}). Rename it or attach the right file.`
        : null;
    if (refused || !mediaType) {
      await recordAudit(dataSource, { ...actor, action: 'create', entityType: 'attachment', outcome: 'failure', detail: { studyId, fileName: given, reason: 'unsupported-type', detected: mediaType } });
      throw new UnsupportedFileTypeError(refused ?? 'File type not accepted');
    }
    const fileName = withExtension(given, mediaType);
    const stored = await storage.adopt(file.path);
    adopted = true;
    let saved: Pick<Attachment, 'id' | 'uploadedAt'>;
    try {
      saved = await dataSource.transaction(async (db) => {
        await lockEditableStudy(db, studyId);
        const { generatedMaps } = await db.insert(Attachment, {
          studyId,
          fileName,
          mediaType,
          sizeBytes: String(file.size),
          sha256: file.sha256,
          storageKey: stored.key,
          uploadedBy,
        });
        // The id and upload time the database gave the row (RETURNING).
        const row = generatedMaps[0] as Pick<Attachment, 'id' | 'uploadedAt'>;
        await recordAudit(db, { ...actor, action: 'create', entityType: 'attachment', entityId: row.id, outcome: 'success', detail: { studyId, fileName, sha256: file.sha256 } });
        return row;
      });
    } catch (error) {
      // Nothing refers to the bytes when the row was not written.
      await storage.delete(stored.key).catch(() => undefined);
      throw error;
    }
    return { id: saved.id, fileName, mediaType, sizeBytes: file.size, sha256: file.sha256, uploadedAt: saved.uploadedAt.toISOString() };
  } finally {
    if (!adopted) await storage.discard(file.path).catch(() => undefined);
  }
}

/** The first bytes of a file (enough for a type signature). */
async function headOf(file: string, bytes = 4100): Promise<Buffer> {
  const handle = await fs.promises.open(file, 'r');
  try {
    const buffer = Buffer.alloc(bytes);
    const { bytesRead } = await handle.read(buffer, 0, bytes, 0);
    return buffer.subarray(0, bytesRead);
  } finally {
    await handle.close();
  }
}
