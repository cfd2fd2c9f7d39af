import type { DataSource } from 'typeorm';
import { migrateJobQueue } from '../jobs/worker';

/** Brings the database to the current schema: the product's migrations, then the job queue's own schema. */
export async function prepareSchema(dataSource: DataSource, connectionString: string): Promise<string[]> {
  const ran = await dataSource.runMigrations({ transaction: 'each' });
  await migrateJobQueue(connectionString);
  return ran.map((m) => m.name);
}
