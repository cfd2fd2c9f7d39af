import type { StudyState } from '../../shared/study/vocabulary';

/** Anything that runs a statement and answers its rows: a TypeORM manager inside its transaction, or a job's client. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export type StudyLockTarget = { query(text: string, values?: unknown[]): Promise<any[]> };

export interface LockedStudy {
  patientId: string;
  state: StudyState;
  version: number;
}

/**
 * Locks a study's row for the rest of the caller's transaction (`SELECT … FOR UPDATE`), so writers
 * of one study queue, and answers its state, version and patient; `undefined` when there is none.
 * Every change of a study takes this lock first, before any other row of it.
 */
export async function lockStudy(db: StudyLockTarget, id: string): Promise<LockedStudy | undefined> {
  const [row] = await db.query(`SELECT patient_id, state, version FROM study WHERE id = $1 FOR UPDATE`, [id]);
  return row ? { patientId: row.patient_id, state: row.state as StudyState, version: row.version } : undefined;
}
