import type { EntityManager } from 'typeorm';

/**
 * Background work (mail, EHR delivery, code suggestions) goes through graphile-worker's queue in
 * PostgreSQL. A job is added with `add_job` inside the transaction of the change that causes it, so it
 * exists exactly when the change commits: a rolled-back signature sends no mail, and a committed one
 * never loses its mail to a crash between commit and enqueue.
 */
const jobNames = ['send-report-notice', 'deliver-report', 'suggest-codes', 'queue-overdue-notices', 'send-overdue-notice', 'send-delivery-failure-notice'] as const;
export type JobName = (typeof jobNames)[number];

export interface JobOptions {
  /** A job with the same key replaces the waiting one instead of adding a second. */
  jobKey?: string;
  maxAttempts?: number;
  runAt?: Date;
  queueName?: string;
}

export async function addJob(manager: EntityManager, name: JobName | (string & {}), payload: Record<string, unknown>, options: JobOptions = {}): Promise<string> {
  // SQL: graphile-worker's own function, in the caller's transaction.
  const [row] = await manager.query(
    `SELECT id::text FROM graphile_worker.add_job(
       identifier => $1::text, payload => $2::json, queue_name => $3::text, run_at => $4::timestamptz,
       max_attempts => $5::int, job_key => $6::text)`,
    [name, JSON.stringify(payload), options.queueName ?? null, options.runAt ?? null, options.maxAttempts ?? null, options.jobKey ?? null],
  );
  return row.id as string;
}
