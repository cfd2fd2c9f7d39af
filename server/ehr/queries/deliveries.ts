import type { DataSource, EntityManager } from 'typeorm';
import { attentionStatuses, type DeliveryIssue, type DeliveryListItem, type DeliveryStatus, type StudyDelivery } from '../../../shared/delivery/status';

const iso = (d: Date | null) => (d ? d.toISOString() : null);

/**
 * The delivery of every signed version of a study, newest version first. A version whose delivery
 * row is not written yet (the job was queued by the signature and has not run) shows as queued.
 */
export async function listStudyDeliveries(db: DataSource | EntityManager, studyId: string): Promise<StudyDelivery[]> {
  const rows: Record<string, unknown>[] = await db.query(
    `SELECT rv.id AS report_version_id, rv.version_no, rv.status AS report_status, rv.signed_at,
            coalesce(d.status, 'queued') AS status, coalesce(d.attempts, 0) AS attempts, d.last_error, d.http_status, d.issues,
            d.ehr_report_id, coalesce(d.ehr_ids, '[]'::jsonb) AS ehr_ids, coalesce(d.queued_at, rv.signed_at) AS queued_at,
            d.last_attempt_at, d.next_attempt_at, d.delivered_at, d.stopped_at
       FROM report_version rv
       LEFT JOIN report_delivery d ON d.report_version_id = rv.id
      WHERE rv.study_id = $1
      ORDER BY rv.version_no DESC`,
    [studyId],
  );
  return rows.map((r) => ({
    reportVersionId: r.report_version_id as string,
    versionNo: r.version_no as number,
    reportStatus: r.report_status as 'final' | 'amended',
    status: r.status as DeliveryStatus,
    attempts: r.attempts as number,
    lastError: r.last_error as string | null,
    httpStatus: r.http_status as number | null,
    issues: (r.issues as DeliveryIssue[] | null) ?? [],
    ehrReportId: r.ehr_report_id as string | null,
    ehrIds: r.ehr_ids as StudyDelivery['ehrIds'],
    queuedAt: (r.queued_at as Date).toISOString(),
    lastAttemptAt: iso(r.last_attempt_at as Date | null),
    nextAttemptAt: iso(r.next_attempt_at as Date | null),
    deliveredAt: iso(r.delivered_at as Date | null),
    stoppedAt: iso(r.stopped_at as Date | null),
  }));
}

/**
 * Deliveries that need attention (retrying, rejected, given up), most recent first: accession number,
 * status, Isobar's error text and the issues' codes and locations — no patient data, and not the
 * EHR's free-text diagnostics, which may quote it.
 */
export async function listDeliveriesNeedingAttention(
  db: DataSource | EntityManager,
  options: { statuses?: readonly DeliveryStatus[]; limit?: number } = {},
): Promise<DeliveryListItem[]> {
  const statuses = options.statuses?.length ? options.statuses : attentionStatuses;
  const rows: Record<string, unknown>[] = await db.query(
    `SELECT d.report_version_id, s.accession, rv.version_no, d.status, d.attempts, d.last_error, d.http_status, d.issues,
            d.last_attempt_at, d.next_attempt_at, d.stopped_at
       FROM report_delivery d
       JOIN report_version rv ON rv.id = d.report_version_id
       JOIN study s ON s.id = d.study_id
      WHERE d.status = ANY($1::text[])
      ORDER BY d.updated_at DESC, d.id
      LIMIT $2`,
    [statuses, Math.min(Math.max(options.limit ?? 200, 1), 500)],
  );
  return rows.map((r) => ({
    reportVersionId: r.report_version_id as string,
    accession: r.accession as string,
    versionNo: r.version_no as number,
    status: r.status as DeliveryStatus,
    attempts: r.attempts as number,
    lastError: r.last_error as string | null,
    httpStatus: r.http_status as number | null,
    issues: ((r.issues as DeliveryIssue[] | null) ?? []).map((i) => ({ severity: i.severity, code: i.code, ...(i.expression ? { expression: i.expression } : {}) })),
    lastAttemptAt: iso(r.last_attempt_at as Date | null),
    nextAttemptAt: iso(r.next_attempt_at as Date | null),
    stoppedAt: iso(r.stopped_at as Date | null),
  }));
}
