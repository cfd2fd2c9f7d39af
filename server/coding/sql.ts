import type { DataSource, EntityManager } from 'typeorm';

/**
 * @deprecated Services take TypeORM's `EntityManager` (the job queue's tasks open their own
 * transaction on the app's DataSource). Kept only for `storeSuggestions` and its callers until they
 * take a manager too.
 *
 * Run a statement, get its rows.
 */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export type Sql = (text: string, values?: unknown[]) => Promise<any[]>;

/** @deprecated See `Sql`. */
export const sqlOf = (db: DataSource | EntityManager): Sql => (text, values) => db.query(text, values);

/** @deprecated See `Sql`. `recordAudit` accepts anything with TypeORM's `query(text, values)`; a Sql is adapted to it. */
export const auditTarget = (sql: Sql) => ({ query: (text: string, values?: unknown[]) => sql(text, values) }) as unknown as EntityManager;
