import { EntityManager } from 'typeorm';
import type { StudyState } from '../../shared/study/vocabulary';
import { Study } from '../db/entities/study.entity';

/** Anything that runs a statement and answers its rows: a job's client (the server passes its TypeORM manager). */
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
export async function lockStudy(db: EntityManager | StudyLockTarget, id: string): Promise<LockedStudy | undefined> {
  if (db instanceof EntityManager) {
    const row = await db
      .createQueryBuilder(Study, 's')
      .select(['s.id', 's.patientId', 's.state', 's.version'])
      .where('s.id = :id', { id })
      .setLock('pessimistic_write')
      .getOne();
    return row ? { patientId: row.patientId, state: row.state as StudyState, version: row.version } : undefined;
  }
  // A job's plain client has no entity metadata: the same lock in SQL.
  const [row] = await db.query(`SELECT patient_id, state, version FROM study WHERE id = $1 FOR UPDATE`, [id]);
  return row ? { patientId: row.patient_id, state: row.state as StudyState, version: row.version } : undefined;
}
