import { createHash } from 'node:crypto';
import type { Pool, QueryResultRow } from 'pg';
import type { DataSource } from 'typeorm';

/** The pg pool TypeORM already holds, so hot paths need no second pool. */
export function poolOf(dataSource: DataSource): Pool {
  return (dataSource.driver as unknown as { master: Pool }).master;
}

/** Statement names by SQL text: the same text always gets the same name. */
const names = new Map<string, string>();
const nameOf = (text: string) => {
  let name = names.get(text);
  if (!name) {
    if (names.size > 1000) names.clear(); // generated texts are few (one per filter combination); this is a backstop
    name = `isobar_${createHash('sha1').update(text).digest('hex').slice(0, 20)}`;
    names.set(text, name);
  }
  return name;
};

/**
 * A statement on a hot path, sent as a named prepared statement straight to the pool: each pooled
 * connection parses and plans it once, later requests only bind and execute (one round trip, no
 * planning, no ORM query runner). Errors are the driver's own (SQLSTATE in `code`), which the
 * problem handler and the outage check read as they read TypeORM's. `prepare: false` sends it
 * unnamed, planned for its values each time: for statements whose best plan depends on them (after
 * five runs PostgreSQL may settle on one generic plan for a named statement).
 */
export async function preparedQuery<R extends QueryResultRow = Record<string, never>>(
  dataSource: DataSource,
  text: string,
  values: unknown[],
  { prepare = true }: { prepare?: boolean } = {},
): Promise<R[]> {
  const { rows } = await poolOf(dataSource).query<R>(prepare ? { name: nameOf(text), text, values } : { text, values });
  return rows;
}
