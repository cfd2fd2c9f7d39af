import type { CodingQueueQuery, QueueItem, ReviewStatus } from '../../../shared/coding/review';
import type { Sql } from '../sql';

/**
 * The coding queue: studies whose review is open (or in the status asked for), oldest first by when
 * the set in force was made, with the age, the number of suggested codes and of blocking warnings.
 * Filters: the operating physician and the day the report was signed (or amended).
 */
export async function listQueue(sql: Sql, query: CodingQueueQuery, now = new Date()): Promise<QueueItem[]> {
  const values: unknown[] = [];
  const where: string[] = [query.status === 'open' ? `r.status <> 'coded'` : `r.status = $${values.push(query.status)}`];
  if (query.operatorId) where.push(`s.operator_id = $${values.push(query.operatorId)}`);
  if (query.from) where.push(`r.queued_at >= $${values.push(query.from)}::date`);
  if (query.to) where.push(`r.queued_at < $${values.push(query.to)}::date + 1`);
  const rows = await sql(
    `SELECT r.study_id, r.status, r.queued_at, cs.version_no,
            (SELECT count(*)::int FROM code_line l WHERE l.set_id = cs.id AND l.origin = 'suggested') AS code_count,
            (SELECT count(*)::int FROM jsonb_array_elements(cs.warnings) w WHERE (w ->> 'blocking')::boolean) AS blocking_warnings,
            s.accession, p.mrn, p.family_name, p.given_name, to_char(p.birth_date, 'YYYY-MM-DD') AS birth_date, u.display_name AS operator_name
     FROM coding_review r
     JOIN code_suggestion_set cs ON cs.id = r.current_set_id
     JOIN study s ON s.id = r.study_id
     JOIN patient p ON p.id = s.patient_id
     LEFT JOIN app_user u ON u.id = s.operator_id
     WHERE ${where.join(' AND ')}
     ORDER BY r.queued_at ASC, r.study_id
     LIMIT 200`,
    values,
  );
  return rows.map((r) => ({
    studyId: r.study_id,
    accession: r.accession,
    patient: { mrn: r.mrn, familyName: r.family_name, givenName: r.given_name, birthDate: r.birth_date },
    operatorName: r.operator_name,
    status: r.status as ReviewStatus,
    versionNo: r.version_no,
    queuedAt: (r.queued_at as Date).toISOString(),
    hoursWaiting: Math.max(0, Math.floor((now.getTime() - (r.queued_at as Date).getTime()) / 36e5)),
    codeCount: r.code_count,
    blockingWarnings: r.blocking_warnings,
  }));
}
