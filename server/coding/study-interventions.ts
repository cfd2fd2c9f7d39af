import type { EntityManager } from 'typeorm';
import type { StudySections } from '../../shared/study/schema';
import { CoronaryIntervention as InterventionRow } from '../db/entities/coding.entities';

type Intervention = StudySections['coding']['interventions'][number];

/** The coding section's interventions, in the order the form holds them. */
export async function loadInterventions(manager: EntityManager, studyId: string): Promise<Intervention[]> {
  const rows = await manager.find(InterventionRow, { where: { studyId }, order: { position: 'ASC' } });
  return rows.map((r) => ({
    id: r.id,
    vessel: r.vessel as Intervention['vessel'],
    kind: r.kind as Intervention['kind'],
    branch: r.branch,
    stent: r.stent as Intervention['stent'],
  }));
}

/** Replaced whole, like the other row sections: the client owns the ids and the order. */
export async function replaceInterventions(db: EntityManager, studyId: string, interventions: Intervention[]): Promise<void> {
  await db.delete(InterventionRow, { studyId });
  if (interventions.length) await db.insert(InterventionRow, interventions.map((r, position) => ({ ...r, studyId, position })));
}
