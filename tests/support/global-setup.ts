import { createDataSource } from '../../server/db/data-source';
import { prepareSchema } from '../../server/db/prepare';

/** Once per run: bring the test database (made fresh by `npm test`) to the current schema. */
export default async function setup(): Promise<void> {
  const url = process.env.DATABASE_URL;
  if (!url) {
    console.warn('DATABASE_URL is not set: database tests will fail. Run the suite with `npm test`.');
    return;
  }
  const dataSource = createDataSource(url, 2);
  await dataSource.initialize();
  try {
    await prepareSchema(dataSource, url);
  } finally {
    await dataSource.destroy();
  }
}
