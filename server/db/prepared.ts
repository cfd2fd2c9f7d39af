import { createHash } from 'node:crypto';
import pg, { type Pool, type PoolClient, type QueryConfig, type QueryResultRow } from 'pg';
import { EntityManager, type DataSource } from 'typeorm';
import { uuidPattern } from '../../shared/uuid';

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
  const { rows } = await poolOf(dataSource).query<R>(prepare ? namedStatement(text, values) : { text, values });
  return rows;
}

/** A named statement for `text`: parsed and planned once per connection. */
export const namedStatement = (text: string, values: unknown[]): QueryConfig => ({ name: nameOf(text), text, values });

/**
 * The pg connection `db` runs on: a transaction's own connection for a manager inside one (so its
 * statements see and hold what the transaction did), else the pool. A statement sent through it goes
 * out at once, before the caller's next line runs.
 */
async function connectionOf(db: DataSource | EntityManager | PoolClient): Promise<Pick<PoolClient, 'query'>> {
  if (isPoolClient(db)) return db;
  if (db instanceof EntityManager) {
    const runner = db.queryRunner;
    if (runner && !runner.isReleased) return (await runner.connect()) as PoolClient;
    return poolOf(db.connection);
  }
  return poolOf(db);
}

/** `preparedQuery` on the connection `db` runs on (see `connectionOf`): for hot statements inside transactions too. */
export async function preparedOn<R extends QueryResultRow = Record<string, never>>(db: DataSource | EntityManager | PoolClient, text: string, values: unknown[]): Promise<R[]> {
  const { rows } = await (await connectionOf(db)).query<R>(namedStatement(text, values));
  return rows;
}

const isPoolClient = (db: unknown): db is PoolClient => db instanceof pg.Client;

/**
 * A UUID written into a statement's text as a `uuid` literal, for the statement `inPooledTransaction`
 * sends with BEGIN (a text query of two statements takes no parameters). Only a well-formed UUID is
 * accepted — nothing else is ever written into SQL text — so the literal needs no escaping and, should
 * the statement fail and PostgreSQL log its text, holds no patient data.
 */
export function uuidLiteral(id: string): string {
  if (!uuidPattern.test(id)) throw new TypeError('uuidLiteral: not a UUID');
  return `'${id}'::uuid`;
}

/** A transaction on a pooled connection of its own (see `inPooledTransaction`). */
export interface PooledTransaction {
  client: PoolClient;
  /** The rows of the opening statement, which went out with BEGIN. */
  opened: QueryResultRow[];
}

/** How long a transaction of `inPooledTransaction` may sit idle before PostgreSQL ends it. */
export const IDLE_IN_TRANSACTION_LIMIT = '60s';

/**
 * Runs `work` in a transaction on a pooled connection of its own, without the ORM's query runner, for
 * the signature (benchmarked: scripts/bench-sign.ts). `opening` (its values written with
 * `uuidLiteral`) is sent with BEGIN as one round trip and its rows handed to `work`; COMMIT follows
 * `work`, ROLLBACK any error. While the connection is held, an error the connection itself raises (the
 * server ended the session, the network dropped it) is caught here and closes the connection instead of
 * reaching the process as an unhandled event; the statement waiting on it fails and the caller's error
 * handling answers.
 */
export async function inPooledTransaction<T>(dataSource: DataSource, opening: string, work: (tx: PooledTransaction) => Promise<T>): Promise<T> {
  const client = await poolOf(dataSource).connect();
  let broken: Error | undefined;
  const onConnectionError = (error: Error) => {
    broken = error;
  };
  client.on('error', onConnectionError);
  try {
    // The statements of one text answer one result each: BEGIN's, the SET's, then the opening
    // statement's. Should the caller stall with the transaction open (a render that never ends), the
    // database ends it after a minute and its locks go with it.
    const results = (await client.query(`BEGIN; SET LOCAL idle_in_transaction_session_timeout = '${IDLE_IN_TRANSACTION_LIMIT}'; ${opening}`)) as unknown as pg.QueryResult[];
    const result = await work({ client, opened: results[2].rows });
    await client.query('COMMIT');
    return result;
  } catch (error) {
    if (!broken) {
      await client.query('ROLLBACK').catch((rollbackError: Error) => {
        broken = rollbackError;
      });
    }
    throw error;
  } finally {
    client.off('error', onConnectionError);
    client.release(broken);
  }
}
