import { Logger } from 'graphile-worker';

/** The part of the server's logger the queue writes to. */
export interface ServerLog {
  info(obj: object, msg?: string): void;
  warn(obj: object, msg?: string): void;
  error(obj: object, msg?: string): void;
}

/**
 * graphile-worker's log lines through the server's logger, or to the console for warnings and errors
 * only. Job payloads are never logged: they may name a study.
 */
export function workerLogger(log?: ServerLog): Logger {
  return new Logger(() => (level, message, meta) => {
    const fields = { component: 'job-queue', task: (meta as { job?: { task_identifier?: string } } | undefined)?.job?.task_identifier };
    if (level === 'error') {
      if (log) log.error(fields, message);
      else console.error(`[jobs] ${message}`);
    } else if (level === 'warning') {
      if (log) log.warn(fields, message);
      else console.warn(`[jobs] ${message}`);
    } else if (log && level === 'info') log.info(fields, message);
  });
}
