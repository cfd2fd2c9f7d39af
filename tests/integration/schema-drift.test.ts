import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { openTestDatabase } from '../support/app';

let db: DataSource;
beforeAll(async () => {
  db = await openTestDatabase();
});
afterAll(async () => {
  await db.destroy();
});

/** TypeORM's names for the PostgreSQL types the migrations use. */
const sameType = (entity: string, table: string) =>
  ({
    uuid: 'uuid',
    text: 'text',
    boolean: 'boolean',
    smallint: 'smallint',
    integer: 'integer',
    increment: 'integer',
    int: 'integer',
    int4: 'integer',
    bigint: 'bigint',
    numeric: 'numeric',
    date: 'date',
    char: 'character',
    timestamptz: 'timestamp with time zone',
    jsonb: 'jsonb',
    bytea: 'bytea',
  })[entity] === table;

describe('entities and migrations describe the same tables', () => {
  it('has a column of the same name, type and nullability for every entity column, and no table column the entity forgets', async () => {
    for (const meta of db.entityMetadatas) {
      const rows: { column_name: string; data_type: string; is_nullable: string }[] = await db.query(
        `SELECT column_name, data_type, is_nullable FROM information_schema.columns WHERE table_name = $1`,
        [meta.tableName],
      );
      expect(rows.length, meta.tableName).toBeGreaterThan(0);
      const table = new Map(rows.map((r) => [r.column_name, r]));
      for (const column of meta.columns) {
        const row = table.get(column.databaseName);
        expect(row, `${meta.tableName}.${column.databaseName} missing`).toBeDefined();
        expect(column.isArray ? row!.data_type === 'ARRAY' : sameType(column.type === Number ? 'integer' : String(column.type), row!.data_type), `${meta.tableName}.${column.databaseName}: ${String(column.type)} vs ${row!.data_type}`).toBe(true);
        expect(row!.is_nullable === 'YES', `${meta.tableName}.${column.databaseName} nullability`).toBe(column.isNullable);
      }
      const mapped = new Set(meta.columns.map((c) => c.databaseName));
      expect([...table.keys()].filter((c) => !mapped.has(c)), `${meta.tableName} columns with no entity field`).toEqual([]);
    }
  });
});
