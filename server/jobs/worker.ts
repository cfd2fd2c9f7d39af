import { Logger as WorkerLogger, parseCronItems, run, runMigrations, type CronItem, type Runner, type TaskList } from 'graphile-worker';
import pg from 'pg';
import { defaultLogger, safeError, type Logger } from '../log';

export type { CronItem, TaskList };

/** graphile-worker's log lines through ours, as data (its messages carry no request text). */
function workerLogger(logger: Logger): WorkerLogger {
  return new WorkerLogger(() => (level, message, meta) => {
    const fields = { component: 'jobs', ...(meta && typeof meta === 'object' && 'error' in meta ? { err: safeError((meta as { error: unknown }).error) } : {}) };
    const method = level === 'error' ? 'error' : level === 'warning' ? 'warn' : 'debug';
    logger[method](fields, message);
  });
}

/** Creates or updates the job queue's schema. Run by the owner role, before the server starts. */
export async function migrateJobQueue(ownerUrl: string, logger: Logger = defaultLogger()): Promise<void> {
  await runMigrations({ connectionString: ownerUrl, logger: workerLogger(logger) });
}

export interface WorkerHandle {
  stop(): Promise<void>;
}

/**
 * Works the queue with the server's role: tasks run with retries and exponential backoff. The
 * schema must already be migrated (by the owner); the worker only reads its migration ledger.
 */
export async function startWorker(
  taskList: TaskList,
  {
    databaseUrl,
    logger = defaultLogger(),
    concurrency = 2,
    pollInterval = 1000,
    cronItems = [],
  }: { databaseUrl: string; logger?: Logger; concurrency?: number; pollInterval?: number; cronItems?: CronItem[] },
): Promise<WorkerHandle> {
  const pool = new pg.Pool({ connectionString: databaseUrl, max: concurrency + 2, connectionTimeoutMillis: 3000 });
  pool.on('error', (error) => logger.warn({ err: safeError(error) }, 'job queue connection failed'));
  // A connection that fails while a task holds it must not end the process (graphile-worker checks for this handler).
  pool.on('connect', (client) => client.on('error', (error) => logger.warn({ err: safeError(error) }, 'job queue connection failed while in use')));
  let runner: Runner;
  try {
    runner = await run({ pgPool: pool, taskList, concurrency, pollInterval, noHandleSignals: true, logger: workerLogger(logger), parsedCronItems: parseCronItems(cronItems) });
  } catch (error) {
    await pool.end();
    throw error;
  }
  return {
    async stop() {
      await runner.stop();
      await pool.end();
    },
  };
}
