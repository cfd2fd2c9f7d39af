import type { EntityManager } from 'typeorm';
import { addJob } from '../jobs/queue';
import { enqueueDelivery } from '../ehr/enqueue-delivery';

/**
 * What follows a signature, joined inside the signing transaction: the referrer's notice, the code
 * suggestions and the EHR delivery are queued exactly when the version commits, never after a
 * second call that could be lost.
 */
export async function onReportSigned(manager: EntityManager, reportVersionId: string): Promise<void> {
  await addJob(manager, 'send-report-notice', { reportVersionId }, { jobKey: `notice:${reportVersionId}`, maxAttempts: 25 });
  await addJob(manager, 'suggest-codes', { reportVersionId }, { jobKey: `codes:${reportVersionId}`, maxAttempts: 5 });
  await enqueueDelivery(manager, reportVersionId);
}
