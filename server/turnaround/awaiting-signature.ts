import type { DataSource } from 'typeorm';
import type { StartBasis } from '../../shared/turnaround/figures';
import type { UnsignedList, UnsignedStudy } from '../../shared/turnaround/unsigned';
import { waitingSince } from '../../shared/turnaround/overdue';
import { summarySelect, toSummary } from '../studies/worklist';
import type { TurnaroundSettings } from './settings';

/**
 * Unsigned studies, longest waiting first, with their age against the signature target. A study
 * with no procedure time counts from when its record was opened, so none is left out.
 */
export async function awaitingSignature(db: DataSource, settings: TurnaroundSettings, now = new Date(), limit = 200): Promise<UnsignedList> {
  const [waiting, [counts]] = await Promise.all([
    db.query(
      `SELECT t.study_id, t.started_at, t.start_basis, t.physician_id, u.display_name AS owner_name
       FROM study_turnaround t LEFT JOIN app_user u ON u.id = t.physician_id
       WHERE t.signed_at IS NULL ORDER BY t.started_at, t.study_id LIMIT $1`,
      [limit],
    ),
    db.query(
      `SELECT count(*)::int AS total, count(*) FILTER (WHERE t.started_at < $1::timestamptz - make_interval(secs => $2::float8 * 3600))::int AS overdue
       FROM study_turnaround t WHERE t.signed_at IS NULL`,
      [now, settings.signatureTargetHours],
    ),
  ]);
  const ids = waiting.map((w: { study_id: string }) => w.study_id);
  const rows: Record<string, never>[] = ids.length ? await db.query(`${summarySelect} WHERE s.id = ANY($1)`, [ids]) : [];
  const byId = new Map(rows.map((r) => [r.id as string, r]));
  const items: UnsignedStudy[] = [];
  for (const w of waiting as { study_id: string; started_at: Date; start_basis: StartBasis; physician_id: string | null; owner_name: string | null }[]) {
    const row = byId.get(w.study_id);
    if (!row) continue; // signed between the two reads
    items.push({
      ...toSummary(row),
      startedAt: w.started_at.toISOString(),
      startBasis: w.start_basis,
      ownerId: w.physician_id,
      ownerName: w.owner_name,
      ...waitingSince(w.started_at, now, settings.signatureTargetHours),
    });
  }
  return { targetHours: settings.signatureTargetHours, total: counts.total, overdueTotal: counts.overdue, items };
}
