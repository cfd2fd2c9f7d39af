import { loadConfig } from '../config';
import { createDataSource } from '../db/data-source';
import { applyServerPrivileges, roleOf } from '../db/privileges';
import { seedDemo } from '../demo/seed';
import { migrateJobQueue } from '../jobs/worker';

/**
 * Brings the database to the current schema as the owner role (`MIGRATION_DATABASE_URL`): the
 * schema's migrations, the job queue's schema, then the server role's privileges. With `--demo`,
 * loads the demo scenario as well. Safe to run on every start.
 */
export async function prepareDatabase(ownerUrl: string, serverUrl: string): Promise<string[]> {
  const owner = createDataSource(ownerUrl, 2);
  await owner.initialize();
  try {
    const ran = await owner.runMigrations({ transaction: 'each' });
    await migrateJobQueue(ownerUrl);
    await applyServerPrivileges(owner, roleOf(serverUrl));
    return ran.map((m) => m.name);
  } finally {
    await owner.destroy();
  }
}

async function main(): Promise<void> {
  const config = loadConfig();
  const ran = await prepareDatabase(config.migrationDatabaseUrl, config.databaseUrl);
  console.log(ran.length ? `migrations run: ${ran.join(', ')}` : 'schema is up to date');
  if (process.argv.includes('--demo')) {
    // The demo is ordinary rows: loaded with the server's own role.
    const dataSource = createDataSource(config.databaseUrl, 2);
    await dataSource.initialize();
    try {
      await seedDemo(dataSource, config.oidc.issuer);
      console.log('demo scenario loaded');
    } finally {
      await dataSource.destroy();
    }
  }
}

if (process.argv[1]?.endsWith('prepare-database.ts')) {
  main().catch((error) => {
    console.error(error instanceof Error ? error.message : error);
    process.exit(1);
  });
}
