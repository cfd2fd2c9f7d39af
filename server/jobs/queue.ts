import type { EntityManager } from 'typeorm';

export interface JobOptions {
  /** A job with the same key replaces the waiting one instead of adding a second. */
  jobKey?: string;
  maxAttempts?: number;
  runAt?: Date;
  queueName?: string;
}

/**
 * Enqueues a job inside the caller's transaction (graphile-worker's `add_job` SQL function): the job
 * exists exactly when the transaction commits, so a rolled-back change never sends an e-mail or
 * builds a report for something that did not happen.
 */
export async function addJob(manager: EntityManager, name: string, payload: Record<string, unknown>, options: JobOptions = {}): Promise<string> {
  const [row] = await manager.query(
    `SELECT id::text FROM graphile_worker.add_job(
       identifier => $1::text, payload => $2::json, queue_name => $3::text, run_at => $4::timestamptz,
       max_attempts => $5::int, job_key => $6::text)`,
    [name, JSON.stringify(payload), options.queueName ?? null, options.runAt ?? null, options.maxAttempts ?? null, options.jobKey ?? null],
  );
  return row.id as string;
}
