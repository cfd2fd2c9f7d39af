import { run, Logger, type Task } from 'graphile-worker';
import pg from 'pg';
import { loadConfig } from '../../server/config';
import { createDataSource } from '../../server/db/data-source';
import { createDeliveryTasks, deliveryTaskOptions } from '../../server/ehr/tasks';

/**
 * A worker process for the delivery fault tests: graphile-worker working the job queue with the
 * server's `deliver-report` task, configured from the environment as the server is (DATABASE_URL,
 * EHR_FHIR_URL, OIDC_ISSUER, EHR_CLIENT_ID/SECRET, EHR_TIMEOUT_SECONDS). It prints one JSON line per
 * event on stdout: `ready`, then `finished` or `failed` with the report version id of each job run.
 *
 * graphile-worker frees a job locked by a process that died once the lock is four hours old; it looks
 * for such jobs every `RESET_LOCKED_MS` here (8–10 minutes in the server), so a test that moves
 * a lock's time back four hours sees the job freed at once.
 */

const emit = (event: Record<string, unknown>) => process.stdout.write(`${JSON.stringify({ pid: process.pid, ...event })}\n`);

async function main(): Promise<void> {
  const config = loadConfig();
  const dataSource = createDataSource(config.databaseUrl, 4);
  await dataSource.initialize();
  const deliver = createDeliveryTasks(dataSource, deliveryTaskOptions(config))['deliver-report']!;
  const task: Task = async (payload, helpers) => {
    const id = (payload as { reportVersionId?: string }).reportVersionId;
    emit({ event: 'started', id });
    try {
      await deliver(payload, helpers);
      emit({ event: 'finished', id });
    } catch (error) {
      emit({ event: 'failed', id, error: (error as Error).message });
      throw error;
    }
  };
  const resetLocked = Number(process.env.RESET_LOCKED_MS ?? 200);
  const pgPool = new pg.Pool({ connectionString: config.databaseUrl, max: 4 });
  pgPool.on('error', () => undefined); // a dropped idle connection; the pool opens another
  await run({
    pgPool,
    taskList: { 'deliver-report': task },
    concurrency: Number(process.env.WORKER_CONCURRENCY ?? 2),
    pollInterval: 100,
    minResetLockedInterval: resetLocked,
    maxResetLockedInterval: resetLocked * 2,
    logger: new Logger(() => () => undefined),
  });
  emit({ event: 'ready' });
}

main().catch((error) => {
  emit({ event: 'crashed', error: (error as Error).message });
  process.exit(1);
});
