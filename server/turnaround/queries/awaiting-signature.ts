import type { DataSource } from 'typeorm';
import type { UnsignedList, UnsignedStudy } from '../../../shared/turnaround/unsigned';
import { waitingSince } from '../../../shared/turnaround/overdue';
import type { WorklistItem } from '../../../shared/study/worklist';
import { summaryJson, summarySelect } from '../../studies/worklist';
import type { TurnaroundSettings } from '../../../shared/settings/lab-settings';
import { StudyTurnaround } from '../../db/entities/turnaround.entities';

/**
 * Unsigned studies, longest waiting first, with their age against the signature target. A study
 * with no procedure time counts from when its record was opened, so none is left out.
 */
export async function awaitingSignature(db: DataSource, settings: TurnaroundSettings, now = new Date(), limit = 200): Promise<UnsignedList> {
  const [waiting, [counts]] = await Promise.all([
    db.manager
      .createQueryBuilder(StudyTurnaround, 't')
      .select(['t.studyId', 't.startedAt', 't.startBasis', 't.physicianId'])
      .leftJoin('t.physician', 'u')
      .addSelect(['u.id', 'u.displayName'])
      .where('t.signed_at IS NULL')
      .orderBy('t.started_at')
      .addOrderBy('t.study_id')
      .limit(limit)
      .getMany(),
    // SQL: both counts in one pass over the unsigned rows (FILTER), the deadline computed in the database.
    db.query(
      `SELECT count(*)::int AS total, count(*) FILTER (WHERE t.started_at < $1::timestamptz - make_interval(secs => $2::float8 * 3600))::int AS overdue
       FROM study_turnaround t WHERE t.signed_at IS NULL`,
      [now, settings.signatureTargetHours],
    ),
  ]);
  const ids = waiting.map((w) => w.studyId);
  // SQL: the worklist's own summary select and item (server/studies/worklist.ts), so both lists show a study alike.
  const rows: Array<{ item: WorklistItem }> = ids.length ? await db.query(`SELECT ${summaryJson('q')} AS item FROM (${summarySelect} WHERE s.id = ANY($1)) q`, [ids]) : [];
  const byId = new Map(rows.map((r) => [r.item.id, r.item]));
  const items: UnsignedStudy[] = [];
  for (const w of waiting) {
    const row = byId.get(w.studyId);
    if (!row) continue; // signed between the two reads
    items.push({
      ...row,
      startedAt: w.startedAt.toISOString(),
      startBasis: w.startBasis,
      ownerId: w.physicianId,
      ownerName: w.physician?.displayName ?? null,
      ...waitingSince(w.startedAt, now, settings.signatureTargetHours),
    });
  }
  return { targetHours: settings.signatureTargetHours, total: counts.total, overdueTotal: counts.overdue, items };
}
