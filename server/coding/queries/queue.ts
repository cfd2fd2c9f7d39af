import type { EntityManager } from 'typeorm';
import type { CodingQueueQuery, QueueItem, ReviewStatus } from '../../../shared/coding/review';
import { CodingReview } from '../../db/entities/coding.entities';
import { localMidnight } from '../../db/local-midnight';
import { labSettings } from '../../settings/queries/lab-settings';

/**
 * The coding queue: studies whose review is open (or in the status asked for), oldest first by when
 * the set in force was made, with the age, the number of suggested codes and of blocking warnings.
 * Filters: the operating physician and the day the report was signed (or amended).
 */
export async function listQueue(manager: EntityManager, query: CodingQueueQuery, now = new Date()): Promise<QueueItem[]> {
  const qb = manager
    .createQueryBuilder(CodingReview, 'r')
    .innerJoin('r.currentSet', 'cs')
    .innerJoin('r.study', 's')
    .innerJoin('s.patient', 'p')
    .leftJoin('s.operator', 'u')
    .select(['r.studyId', 'r.status', 'r.queuedAt', 'cs.id', 'cs.versionNo', 's.id', 's.accession', 'p.id', 'p.mrn', 'p.familyName', 'p.givenName', 'p.birthDate', 'u.id', 'u.displayName'])
    // Counted in the statement that reads the page (a count per row would be a round trip per row).
    .addSelect(`(SELECT count(*)::int FROM code_line l WHERE l.set_id = cs.id AND l.origin = 'suggested')`, 'code_count')
    .addSelect(`(SELECT count(*)::int FROM jsonb_array_elements(cs.warnings) w WHERE (w ->> 'blocking')::boolean)`, 'blocking_warnings')
    .where(query.status === 'open' ? `r.status <> 'coded'` : 'r.status = :status', { status: query.status });
  if (query.operatorId) qb.andWhere('s.operatorId = :operatorId', { operatorId: query.operatorId });
  // Days are the lab's calendar days, cut as the export of coded studies cuts them.
  if (query.from || query.to) {
    const { timeZone } = await labSettings(manager);
    if (query.from) qb.andWhere(`r.queuedAt >= ${localMidnight('CAST(:from AS date)', ':timeZone')}`, { from: query.from, timeZone });
    if (query.to) qb.andWhere(`r.queuedAt < ${localMidnight('CAST(:to AS date) + 1', ':timeZone')}`, { to: query.to, timeZone });
  }
  const { entities, raw } = await qb.orderBy('r.queuedAt', 'ASC').addOrderBy('r.studyId').limit(200).getRawAndEntities<{ code_count: number; blocking_warnings: number }>();
  return entities.map((r, i) => {
    const study = r.study!;
    const patient = study.patient!;
    return {
      studyId: r.studyId,
      accession: study.accession,
      patient: { mrn: patient.mrn, familyName: patient.familyName, givenName: patient.givenName, birthDate: patient.birthDate },
      operatorName: study.operator?.displayName ?? null,
      status: r.status,
      versionNo: r.currentSet!.versionNo,
      queuedAt: r.queuedAt.toISOString(),
      hoursWaiting: Math.max(0, Math.floor((now.getTime() - r.queuedAt.getTime()) / 36e5)),
      codeCount: raw[i].code_count,
      blockingWarnings: raw[i].blocking_warnings,
    };
  });
}
