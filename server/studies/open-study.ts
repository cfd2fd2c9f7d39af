import type { DataSource } from 'typeorm';
import type { CreateStudy, StudyRecord } from '../../shared/study/schema';
import { recordAudit, type AuditActor } from '../audit/audit';
import { createStudy, loadStudy } from './repository';
import { PatientMismatchError } from './errors';

/**
 * Opens a new study for a patient and returns it as stored. An MRN on file for someone else is
 * refused, and who tried which MRN against which differing fields goes to the audit trail (never
 * into the answer).
 */
export async function openStudy(dataSource: DataSource, input: CreateStudy, createdBy: string | null, actor: AuditActor): Promise<StudyRecord> {
  let id: string;
  try {
    // The study and its audit row commit together.
    id = await dataSource.transaction(async (db) => {
      const created = await createStudy(db, input, createdBy);
      await recordAudit(db, { ...actor, action: 'create', entityType: 'study', entityId: created, outcome: 'success', detail: { mrn: input.patient.mrn } });
      return created;
    });
  } catch (error) {
    if (error instanceof PatientMismatchError) {
      await recordAudit(dataSource, { ...actor, action: 'create', entityType: 'study', outcome: 'failure', detail: { reason: 'patient-mismatch', mrn: error.mrn, differs: error.fields } });
    }
    throw error;
  }
  return (await loadStudy(dataSource, id))!;
}
