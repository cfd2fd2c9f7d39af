import type { JobName, JobOptions } from '../jobs/queue';
import { deliveryJobKey, DELIVERY_MAX_ATTEMPTS } from '../ehr/enqueue-delivery';

export interface QueuedJob {
  name: JobName;
  payload: Record<string, unknown>;
  options: Required<Pick<JobOptions, 'jobKey' | 'maxAttempts'>>;
}

/**
 * What follows a signature, queued inside the signing transaction (see `storeSignature` in
 * sign-study.ts): the referrer's notice and the EHR delivery (with its "queued" delivery row) exist
 * exactly when the version commits, never after a second call that could be lost. The code
 * suggestions are not a job: they are planned and written by the signature's own statement
 * (`planSuggestions` and `suggestionWrites` of server/coding/store-suggestions.ts).
 */
export function jobsOnReportSigned(reportVersionId: string): QueuedJob[] {
  return [
    { name: 'send-report-notice', payload: { reportVersionId }, options: { jobKey: `notice:${reportVersionId}`, maxAttempts: 25 } },
    { name: 'deliver-report', payload: { reportVersionId }, options: { jobKey: deliveryJobKey(reportVersionId), maxAttempts: DELIVERY_MAX_ATTEMPTS } },
  ];
}
