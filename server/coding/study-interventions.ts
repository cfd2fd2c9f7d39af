import type { EntityManager } from 'typeorm';
import type { StudySections } from '../../shared/study/schema';
import { CoronaryIntervention as InterventionRow } from '../db/entities/coding.entities';

type Intervention = StudySections['coding']['interventions'][number];

/** Replaced whole, like the other row sections: the client owns the ids and the order. */
export async function replaceInterventions(db: EntityManager, studyId: string, interventions: Intervention[]): Promise<void> {
  await db.delete(InterventionRow, { studyId });
  if (interventions.length) await db.insert(InterventionRow, interventions.map((r, position) => ({ ...r, studyId, position })));
}
