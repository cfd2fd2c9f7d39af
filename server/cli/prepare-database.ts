import { loadConfig } from '../config';
import { createDataSource } from '../db/data-source';
import { prepareSchema } from '../db/prepare';
import { seedDemo } from '../demo/seed';

/**
 * Brings the database to the current schema; with `--demo`, loads the demo scenario as well.
 * Safe to run on every start.
 */
async function main(): Promise<void> {
  const config = loadConfig();
  const dataSource = createDataSource(config.databaseUrl, 2);
  await dataSource.initialize();
  try {
    const ran = await prepareSchema(dataSource, config.databaseUrl);
    console.log(ran.length ? `migrations run: ${ran.join(', ')}` : 'schema is up to date');
    if (process.argv.includes('--demo')) {
      await seedDemo(dataSource, config.oidc.issuer);
      console.log('demo scenario loaded');
    }
  } finally {
    await dataSource.destroy();
  }
}

main().catch((error) => {
  console.error(error instanceof Error ? error.message : error);
  process.exit(1);
});
