import { createServer } from 'node:http';
import { loadConfig, ConfigError } from './config';
import { createDataSource } from './db/data-source';
import { createApp } from './app';
import { startWorker } from './jobs/worker';
import { taskList } from './jobs/tasks';

/** Starts the server: connects to the database, serves `/api` and the web build, stops cleanly. */
async function main(): Promise<void> {
  const config = loadConfig();
  const dataSource = createDataSource(config.databaseUrl, config.databasePoolSize);
  await dataSource.initialize();
  const pending = await dataSource.showMigrations();
  if (pending) {
    throw new Error('The database has migrations that have not been run. Run `npm start`, which runs them first.');
  }

  const server = createServer(createApp({ config, dataSource }));
  server.requestTimeout = 60_000;
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(config.port, config.host, resolve);
  });
  console.log(`Isobar server listening on ${config.publicUrl}`);
  // Background work (notices, code suggestions, EHR delivery) runs beside the server, from the queue in PostgreSQL.
  const worker = config.jobWorker ? await startWorker({ connectionString: config.databaseUrl, tasks: taskList(dataSource, config) }) : null;

  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    console.log(`${signal}: stopping the server`);
    server.close();
    server.closeAllConnections();
    await worker?.stop().catch(() => undefined);
    await dataSource.destroy().catch(() => undefined);
    process.exit(0);
  };
  process.on('SIGINT', () => void stop('SIGINT'));
  process.on('SIGTERM', () => void stop('SIGTERM'));
}

main().catch((error) => {
  console.error(error instanceof ConfigError ? error.message : error);
  process.exit(1);
});
