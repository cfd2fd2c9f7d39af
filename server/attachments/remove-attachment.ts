import type { DataSource } from 'typeorm';
import { recordAudit } from '../audit/audit';
import { lockEditableStudy, type AuditActor } from '../studies/repository';
import { AttachmentNotFoundError } from './errors';
import type { AttachmentStorage } from './storage';

/**
 * Removes an attachment of an editable study, recorded in the audit trail with its name and
 * checksum. The bytes go after the row is gone for good; a failure there leaves only an
 * unreferenced file.
 */
export async function removeAttachment(dataSource: DataSource, storage: AttachmentStorage, attachmentId: string, actor: AuditActor): Promise<void> {
  const removed = await dataSource.transaction(async (db) => {
    const [row] = await db.query(`SELECT id, study_id, file_name, sha256, storage_key FROM attachment WHERE id = $1`, [attachmentId]);
    if (!row) throw new AttachmentNotFoundError();
    await lockEditableStudy(db, row.study_id);
    await db.query(`DELETE FROM attachment WHERE id = $1`, [row.id]);
    await recordAudit(db, { ...actor, action: 'delete', entityType: 'attachment', entityId: row.id, outcome: 'success', detail: { studyId: row.study_id, fileName: row.file_name, sha256: row.sha256 } });
    return row as { storage_key: string };
  });
  await storage.delete(removed.storage_key).catch(() => undefined);
}
