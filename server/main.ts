import { createServer } from 'node:http';
import { loadConfig, ConfigError } from './config';
import { createDataSource } from './db/data-source';
import { createApp } from './app';
import { closePdfThreads, warmPdfThreads } from './report-document/pdf-threads';
import { createLogger, safeError } from './log';
import { startWorker } from './jobs/worker';
import { cronItems, taskList } from './jobs/tasks';

/** Starts the server: connects to the database, serves `/api` and the web build, stops cleanly. */
async function main(): Promise<void> {
  const config = loadConfig();
  const logger = createLogger(config.logLevel);
  const dataSource = createDataSource(config.databaseUrl, config.databasePoolSize, logger);
  await dataSource.initialize();
  const pending = await dataSource.showMigrations();
  if (pending) {
    throw new Error('The database has migrations that have not been run. Run `npm start`, which runs them first.');
  }

  // Background work (notices, code suggestions, EHR delivery) runs beside the server, from the queue in
  // PostgreSQL; its schema was migrated by the owner role (npm start runs that first).
  const worker = config.jobWorker ? await startWorker(taskList(dataSource, config), { databaseUrl: config.databaseUrl, logger, cronItems }) : null;
  // The threads that render signed PDFs, started with their fonts loaded before the first signature.
  await warmPdfThreads();
  const server = createServer(createApp({ config, dataSource, logger }));
  server.requestTimeout = 60_000;
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(config.port, config.host, resolve);
  });
  logger.info({ url: config.publicUrl }, 'server listening');

  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    logger.info({ signal }, 'stopping the server');
    server.close();
    server.closeAllConnections();
    await worker?.stop().catch(() => undefined);
    await closePdfThreads().catch(() => undefined);
    await dataSource.destroy().catch(() => undefined);
    process.exit(0);
  };
  process.on('SIGINT', () => void stop('SIGINT'));
  process.on('SIGTERM', () => void stop('SIGTERM'));
}

main().catch((error) => {
  if (error instanceof ConfigError) console.error(error.message);
  else createLogger('error').fatal({ err: safeError(error) }, 'server failed to start');
  process.exit(1);
});
