import { prepareDatabase } from '../../server/cli/prepare-database';

/**
 * Once per run: bring the test database (made fresh by `npm test`) to the current schema as the
 * owner role, with the server role's privileges, as `npm start` does.
 */
export default async function setup(): Promise<void> {
  const url = process.env.DATABASE_URL;
  if (!url) {
    console.warn('DATABASE_URL is not set: database tests will fail. Run the suite with `npm test`.');
    return;
  }
  await prepareDatabase(process.env.MIGRATION_DATABASE_URL ?? ownerUrlFor(url), url);
}

/** The owner role of the scripts' clusters, for a server URL. */
export function ownerUrlFor(serverUrl: string): string {
  const url = new URL(serverUrl);
  url.username = 'isobar_owner';
  return url.href;
}
