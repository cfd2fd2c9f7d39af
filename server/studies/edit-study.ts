import type { DataSource } from 'typeorm';
import type { PatchStudy, StudyRecord } from '../../shared/study/schema';
import { recordAudit, type AuditActor } from '../audit/audit';
import { DuplicateRowIdError } from './errors';
import { patchStudy } from './repository';
import { PatientMismatchError, StaleVersionError } from './errors';

/** pg's unique-violation code: a client reused a row id that belongs elsewhere. */
const isUniqueViolation = (e: unknown) => (e as { code?: string })?.code === '23505';

/**
 * Replaces whole sections of a draft, named by the version it was read at. A stale version or an
 * MRN on file for someone else is refused and recorded in the audit trail; a vessel or dose row id
 * that belongs to another study is refused.
 */
export async function editStudy(dataSource: DataSource, id: string, patch: PatchStudy, actor: AuditActor): Promise<StudyRecord> {
  try {
    // The edit and its audit row commit together.
    return await dataSource.transaction(async (db) => {
      const { changed, record } = await patchStudy(db, id, patch);
      await recordAudit(db, { ...actor, action: 'update', entityType: 'study', entityId: id, outcome: 'success', detail: { sections: changed, fromVersion: patch.version } });
      return record;
    });
  } catch (error) {
    if (error instanceof StaleVersionError) {
      await recordAudit(dataSource, { ...actor, action: 'update', entityType: 'study', entityId: id, outcome: 'failure', detail: { reason: 'stale-version', fromVersion: patch.version, current: error.current.version } });
    }
    if (error instanceof PatientMismatchError) {
      await recordAudit(dataSource, { ...actor, action: 'update', entityType: 'study', entityId: id, outcome: 'failure', detail: { reason: 'patient-mismatch', mrn: error.mrn, differs: error.fields } });
    }
    if (isUniqueViolation(error)) throw new DuplicateRowIdError();
    throw error;
  }
}
