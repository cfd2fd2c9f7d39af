import type { EntityManager } from 'typeorm';
import { addJob } from '../jobs/queue';
import { enqueueDelivery } from '../ehr/enqueue-delivery';
import { sqlOf } from '../coding/sql';
import { storeSuggestions } from '../coding/store-suggestions';

/**
 * What follows a signature, inside the signing transaction: the code suggestions are made and stored
 * (with their rule ids) and the study put on the coding queue in this same transaction, so a signed
 * version never exists without its suggestions; the referrer's notice and the EHR delivery are queued
 * exactly when the version commits, never after a second call that could be lost.
 */
export async function onReportSigned(manager: EntityManager, reportVersionId: string): Promise<void> {
  await storeSuggestions(sqlOf(manager), reportVersionId);
  await addJob(manager, 'send-report-notice', { reportVersionId }, { jobKey: `notice:${reportVersionId}`, maxAttempts: 25 });
  await enqueueDelivery(manager, reportVersionId);
}
