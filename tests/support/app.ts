import type { AddressInfo } from 'node:net';
import { createServer, type Server } from 'node:http';
import type { DataSource } from 'typeorm';
import { createApp } from '../../server/app';
import { loadConfig, type Config } from '../../server/config';
import { createDataSource } from '../../server/db/data-source';
import { ownerUrlFor } from './global-setup';

export function testConfig(overrides: Partial<Config> = {}): Config {
  return { ...loadConfig(process.env), ...overrides };
}

/** A connected data source on the test database; close it in afterAll. */
export async function openTestDatabase(): Promise<DataSource> {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error('DATABASE_URL is not set: run the suite with `npm test`.');
  const dataSource = createDataSource(url, 4);
  await dataSource.initialize();
  return dataSource;
}

/**
 * The owner role's connection to the test database, for what the server's role may not do
 * (schema changes, setting up a trigger for a test, removing a signed study between files).
 */
export async function openOwnerDatabase(): Promise<DataSource> {
  const url = process.env.MIGRATION_DATABASE_URL ?? ownerUrlFor(process.env.DATABASE_URL ?? '');
  const dataSource = createDataSource(url, 2);
  await dataSource.initialize();
  return dataSource;
}

/**
 * Removes studies whatever their state, as the owner with the signed-study guard lifted for this
 * transaction only (ALTER TABLE is transactional: other sessions never see the guard off).
 * For test housekeeping; the product never deletes a signed study.
 */
export async function removeStudiesAsOwner(where: string, params: unknown[]): Promise<void> {
  const owner = await openOwnerDatabase();
  const guarded = ['study', 'vessel_assessment', 'thermodilution_injection', 'acetylcholine_dose', 'attachment'];
  try {
    await owner.transaction(async (tx) => {
      for (const t of guarded) await tx.query(`ALTER TABLE ${t} DISABLE TRIGGER ${t}_signed_guard`);
      await tx.query(`DELETE FROM study WHERE ${where}`, params);
      for (const t of guarded) await tx.query(`ALTER TABLE ${t} ENABLE TRIGGER ${t}_signed_guard`);
    });
  } finally {
    await owner.destroy();
  }
}

/** The real app listening on a free loopback port (for browser tests). */
export async function startTestServer(dataSource: DataSource): Promise<{ url: string; server: Server; close: () => Promise<void> }> {
  const server = createServer(createApp({ config: testConfig(), dataSource, log: () => undefined }));
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address() as AddressInfo;
  return {
    url: `http://127.0.0.1:${port}`,
    server,
    close: () =>
      new Promise<void>((resolve) => {
        server.closeAllConnections();
        server.close(() => resolve());
      }),
  };
}
