import type { EntityManager } from 'typeorm';
import type { StudyState } from '../../shared/study/vocabulary';
import { Study } from '../db/entities/study.entity';

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
export async function lockStudy(manager: EntityManager, id: string): Promise<LockedStudy | undefined> {
  const row = await manager
    .createQueryBuilder(Study, 's')
    .select(['s.id', 's.patientId', 's.state', 's.version'])
    .where('s.id = :id', { id })
    .setLock('pessimistic_write')
    .getOne();
  return row ? { patientId: row.patientId, state: row.state as StudyState, version: row.version } : undefined;
}
