import type { DataSource } from 'typeorm';
import { neutraliseCsv } from '../../shared/csv/neutralise';
import { recordAudit, type AuditActor } from '../audit/audit';
import { Attachment } from '../db/entities/measurement.entities';
import { AttachmentNotFoundError } from './errors';
import type { AttachmentStorage } from './storage';

/**
 * An attachment's bytes for download, the read recorded in the audit trail. The stored bytes (and
 * their SHA-256) stay as uploaded; a CSV is served with every cell a spreadsheet would run as a
 * formula neutralised (shared/csv/neutralise.ts).
 */
export async function readAttachment(
  dataSource: DataSource,
  storage: AttachmentStorage,
  attachmentId: string,
  actor: AuditActor,
): Promise<{ fileName: string; mediaType: string; bytes: Buffer }> {
  const row = await dataSource.manager.findOne(Attachment, {
    where: { id: attachmentId },
    select: { id: true, studyId: true, fileName: true, mediaType: true, storageKey: true },
  });
  if (!row) throw new AttachmentNotFoundError();
  const stored = await storage.get(row.storageKey);
  const bytes = row.mediaType === 'text/csv' ? Buffer.from(neutraliseCsv(stored.toString('utf8')), 'utf8') : stored;
  await recordAudit(dataSource, { ...actor, action: 'read', entityType: 'attachment', entityId: row.id, outcome: 'success', detail: { studyId: row.studyId } });
  return { fileName: row.fileName, mediaType: row.mediaType, bytes };
}
