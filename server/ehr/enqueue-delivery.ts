import type { EntityManager } from 'typeorm';
import { ReportDelivery } from '../db/entities/report-delivery.entity';
import { ReportVersion } from '../db/entities/report-version.entity';
import { addJob } from '../jobs/queue';

/**
 * Enough tries that the delivery's time limit, not the count, ends the retries: after the tenth the
 * queue waits exp(10) s ≈ 6.1 h between tries, so 500 tries outlast the longest limit allowed (30 days).
 */
export const DELIVERY_MAX_ATTEMPTS = 500;

/** The job key of a version's delivery: enqueueing it again replaces a waiting job instead of adding one. */
export const deliveryJobKey = (reportVersionId: string) => `deliver-report:${reportVersionId}`;

/** Writes a version's delivery row (status queued) unless it has one. */
export async function insertDeliveryRow(manager: EntityManager, reportVersionId: string, studyId: string): Promise<void> {
  await manager.createQueryBuilder().insert().into(ReportDelivery).values({ reportVersionId, studyId }).orIgnore().execute();
}

/** Makes sure a signed version has its delivery row (signing may add only the job); false when there is no such version. */
export async function ensureDeliveryRow(manager: EntityManager, reportVersionId: string): Promise<boolean> {
  const version = await manager.findOne(ReportVersion, { select: { id: true, studyId: true }, where: { id: reportVersionId } });
  if (!version) return false;
  await insertDeliveryRow(manager, reportVersionId, version.studyId);
  return true;
}

/**
 * Queues the delivery of a signed report version, inside the caller's transaction (the signing one,
 * or a resend): the delivery row shows "queued" and the job exists exactly when the transaction commits.
 */
export async function enqueueDelivery(manager: EntityManager, reportVersionId: string): Promise<void> {
  await ensureDeliveryRow(manager, reportVersionId);
  await addJob(manager, 'deliver-report', { reportVersionId }, { jobKey: deliveryJobKey(reportVersionId), maxAttempts: DELIVERY_MAX_ATTEMPTS });
}
