import type { EntityManager } from 'typeorm';
import { addJob } from '../jobs/queue';

/**
 * Enough tries that the delivery's time limit, not the count, ends the retries: after the tenth the
 * queue waits exp(10) s ≈ 6.1 h between tries, so 500 tries outlast the longest limit allowed (30 days).
 */
export const DELIVERY_MAX_ATTEMPTS = 500;

/** The job key of a version's delivery: enqueueing it again replaces a waiting job instead of adding one. */
export const deliveryJobKey = (reportVersionId: string) => `deliver-report:${reportVersionId}`;

/**
 * Queues the delivery of a signed report version, inside the caller's transaction (the signing one,
 * or a resend): the delivery row shows "queued" and the job exists exactly when the transaction commits.
 */
export async function enqueueDelivery(manager: EntityManager, reportVersionId: string): Promise<void> {
  await manager.query(
    `INSERT INTO report_delivery (report_version_id, study_id)
     SELECT id, study_id FROM report_version WHERE id = $1
     ON CONFLICT (report_version_id) DO NOTHING`,
    [reportVersionId],
  );
  await addJob(manager, 'deliver-report', { reportVersionId }, { jobKey: deliveryJobKey(reportVersionId), maxAttempts: DELIVERY_MAX_ATTEMPTS });
}
