import type { AddressInfo } from 'node:net';
import { createServer, type Server } from 'node:http';
import type { DataSource } from 'typeorm';
import { createApp } from '../../server/app';
import { loadConfig, type Config } from '../../server/config';
import { createDataSource } from '../../server/db/data-source';

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
