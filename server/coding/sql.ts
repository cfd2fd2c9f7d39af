import type { DataSource, EntityManager } from 'typeorm';

/**
 * The one thing the coding services need from a connection: run a statement, get its rows. The
 * server passes a TypeORM manager (inside its transaction); the job queue's task a pg client.
 */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export type Sql = (text: string, values?: unknown[]) => Promise<any[]>;

export const sqlOf = (db: DataSource | EntityManager): Sql => (text, values) => db.query(text, values);

export const sqlOfClient =
  (client: { query: (text: string, values?: unknown[]) => Promise<{ rows: unknown[] }> }): Sql =>
  async (text, values) =>
    (await client.query(text, values)).rows;

/** `recordAudit` accepts anything with TypeORM's `query(text, values)`; a Sql is adapted to it. */
export const auditTarget = (sql: Sql) => ({ query: (text: string, values?: unknown[]) => sql(text, values) }) as unknown as EntityManager;
