import type { EntityManager } from 'typeorm';

/**
 * Background work (mail, EHR delivery, overdue notices) goes through graphile-worker's queue in
 * PostgreSQL. A job is added with `add_job` inside the transaction of the change that causes it, so it
 * exists exactly when the change commits: a rolled-back signature sends no mail, and a committed one
 * never loses its mail to a crash between commit and enqueue.
 */
export const jobNames = ['send-report-notice', 'deliver-report', 'suggest-codes'] as const;
export type JobName = (typeof jobNames)[number];

export interface AddJobOptions {
  /** A key that makes a repeated enqueue replace the waiting job instead of adding a second one. */
  jobKey?: string;
  maxAttempts?: number;
  runAt?: Date;
  queueName?: string;
}

export async function addJob(manager: EntityManager, name: JobName, payload: Record<string, unknown>, options: AddJobOptions = {}): Promise<void> {
  await manager.query(
    `SELECT graphile_worker.add_job($1, $2::json, queue_name => $3, run_at => $4, max_attempts => $5, job_key => $6)`,
    [name, JSON.stringify(payload), options.queueName ?? null, options.runAt ?? null, options.maxAttempts ?? null, options.jobKey ?? null],
  );
}
