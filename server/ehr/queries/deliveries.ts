import type { DataSource, EntityManager } from 'typeorm';
import { ReportDelivery } from '../../db/entities/report-delivery.entity';
import { ReportVersion } from '../../db/entities/report-version.entity';
import { Study } from '../../db/entities/study.entity';
import { attentionStatuses, type DeliveryIssue, type DeliveryListItem, type DeliveryStatus, type StudyDelivery } from '../../../shared/delivery/status';

const iso = (d: Date | null) => (d ? d.toISOString() : null);
const managerOf = (db: DataSource | EntityManager): EntityManager => ('manager' in db ? db.manager : db);

/**
 * The delivery of every signed version of a study, newest version first. A version whose delivery
 * row is not written yet (the job was queued by the signature and has not run) shows as queued.
 */
export async function listStudyDeliveries(db: DataSource | EntityManager, studyId: string): Promise<StudyDelivery[]> {
  const versions = (await managerOf(db)
    .createQueryBuilder(ReportVersion, 'rv')
    .leftJoinAndMapOne('rv.delivery', ReportDelivery, 'd', 'd.reportVersionId = rv.id')
    .select(['rv.id', 'rv.versionNo', 'rv.status', 'rv.signedAt'])
    .addSelect(['d.id', 'd.status', 'd.attempts', 'd.lastError', 'd.httpStatus', 'd.issues', 'd.ehrReportId', 'd.ehrIds', 'd.queuedAt', 'd.lastAttemptAt', 'd.nextAttemptAt', 'd.deliveredAt', 'd.stoppedAt'])
    .where('rv.studyId = :studyId', { studyId })
    .orderBy('rv.versionNo', 'DESC')
    .getMany()) as Array<ReportVersion & { delivery?: ReportDelivery }>;
  return versions.map(({ delivery: d, ...rv }) => ({
    reportVersionId: rv.id,
    versionNo: rv.versionNo,
    reportStatus: rv.status,
    status: d?.status ?? 'queued',
    attempts: d?.attempts ?? 0,
    lastError: d?.lastError ?? null,
    httpStatus: d?.httpStatus ?? null,
    issues: d?.issues ?? [],
    ehrReportId: d?.ehrReportId ?? null,
    ehrIds: d?.ehrIds ?? [],
    queuedAt: (d?.queuedAt ?? rv.signedAt).toISOString(),
    lastAttemptAt: iso(d?.lastAttemptAt ?? null),
    nextAttemptAt: iso(d?.nextAttemptAt ?? null),
    deliveredAt: iso(d?.deliveredAt ?? null),
    stoppedAt: iso(d?.stoppedAt ?? null),
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
  const deliveries = (await managerOf(db)
    .createQueryBuilder(ReportDelivery, 'd')
    .innerJoin('d.reportVersion', 'rv')
    .innerJoinAndMapOne('d.study', Study, 's', 's.id = d.studyId')
    .select(['d.id', 'd.reportVersionId', 'd.status', 'd.attempts', 'd.lastError', 'd.httpStatus', 'd.issues', 'd.lastAttemptAt', 'd.nextAttemptAt', 'd.stoppedAt'])
    .addSelect(['rv.id', 'rv.versionNo', 's.id', 's.accession'])
    .where('d.status IN (:...statuses)', { statuses })
    .orderBy('d.updatedAt', 'DESC')
    .addOrderBy('d.id')
    .limit(Math.min(Math.max(options.limit ?? 200, 1), 500))
    .getMany()) as Array<ReportDelivery & { study: Study }>;
  return deliveries.map((d) => ({
    reportVersionId: d.reportVersionId,
    accession: d.study.accession,
    versionNo: d.reportVersion!.versionNo,
    status: d.status,
    attempts: d.attempts,
    lastError: d.lastError,
    httpStatus: d.httpStatus,
    issues: (d.issues ?? []).map((i) => ({ severity: i.severity, code: i.code, ...(i.expression ? { expression: i.expression } : {}) })),
    lastAttemptAt: iso(d.lastAttemptAt),
    nextAttemptAt: iso(d.nextAttemptAt),
    stoppedAt: iso(d.stoppedAt),
  }));
}
