import type { DataSource } from 'typeorm';
import { recordAudit, type AuditActor } from '../audit/audit';
import { Attachment } from '../db/entities/measurement.entities';
import { lockEditableStudy } from '../studies/repository';
import { AttachmentNotFoundError } from './errors';
import type { AttachmentStorage } from './storage';

/**
 * Removes an attachment of an editable study, recorded in the audit trail with its name and
 * checksum. The bytes go after the row is gone for good; a failure there leaves only an
 * unreferenced file.
 */
export async function removeAttachment(dataSource: DataSource, storage: AttachmentStorage, attachmentId: string, actor: AuditActor): Promise<void> {
  const removed = await dataSource.transaction(async (db) => {
    const row = await db.findOne(Attachment, { where: { id: attachmentId }, select: { id: true, studyId: true, fileName: true, sha256: true, storageKey: true } });
    if (!row) throw new AttachmentNotFoundError();
    await lockEditableStudy(db, row.studyId);
    await db.delete(Attachment, { id: row.id });
    await recordAudit(db, { ...actor, action: 'delete', entityType: 'attachment', entityId: row.id, outcome: 'success', detail: { studyId: row.studyId, fileName: row.fileName, sha256: row.sha256 } });
    return row;
  });
  await storage.delete(removed.storageKey).catch(() => undefined);
}
