import { run, runMigrations, type Runner, type TaskList } from 'graphile-worker';
import { workerLogger, type ServerLog } from './log-adapter';

/** Creates or updates the queue's own schema (graphile_worker). Run by the schema owner before the server starts. */
export async function migrateJobQueue(connectionString: string): Promise<void> {
  await runMigrations({ connectionString, logger: workerLogger() });
}

export interface WorkerOptions {
  connectionString: string;
  tasks: TaskList;
  concurrency?: number;
  /** Milliseconds between polls when LISTEN/NOTIFY misses a job. */
  pollInterval?: number;
  log?: ServerLog;
}

/** Starts the worker inside the server process; `stop()` on the returned runner drains it. */
export async function startWorker(options: WorkerOptions): Promise<Runner> {
  return run({
    connectionString: options.connectionString,
    concurrency: options.concurrency ?? 2,
    pollInterval: options.pollInterval ?? 2000,
    noHandleSignals: true,
    taskList: options.tasks,
    logger: workerLogger(options.log),
  });
}
