import type { DataSource } from 'typeorm';
import { neutraliseCsv } from '../../shared/csv/neutralise';
import { recordAudit } from '../audit/audit';
import type { AuditActor } from '../studies/repository';
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
  const [row] = await dataSource.query(`SELECT id, study_id, file_name, media_type, storage_key FROM attachment WHERE id = $1`, [attachmentId]);
  if (!row) throw new AttachmentNotFoundError();
  const stored = await storage.get(row.storage_key);
  const bytes = row.media_type === 'text/csv' ? Buffer.from(neutraliseCsv(stored.toString('utf8')), 'utf8') : stored;
  await recordAudit(dataSource, { ...actor, action: 'read', entityType: 'attachment', entityId: row.id, outcome: 'success', detail: { studyId: row.study_id } });
  return { fileName: row.file_name, mediaType: row.media_type, bytes };
}
