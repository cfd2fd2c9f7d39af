import type { DataSource } from 'typeorm';
import type { StudyRecord } from '../../shared/study/schema';
import { recordAudit, type AuditActor } from '../audit/audit';
import { RecordNotFoundError } from '../errors';
import { loadStudy } from './repository';

/** A study read by a user, recorded in the audit trail (with the view, when it is one). */
export async function readStudy(dataSource: DataSource, id: string, actor: AuditActor, view?: string): Promise<StudyRecord> {
  const study = await loadStudy(dataSource, id);
  if (!study) throw new RecordNotFoundError('No study has this id.');
  await recordAudit(dataSource, { ...actor, action: 'read', entityType: 'study', entityId: study.id, outcome: 'success', ...(view ? { detail: { view } } : {}) });
  return study;
}
