import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { inPooledTransaction, poolOf, sqlLiteral } from '../../server/db/prepared';
import { openTestDatabase } from '../support/app';

// The transaction helper the signature runs on: an opening statement sent with BEGIN, a last
// statement sent with COMMIT. PostgreSQL's simple query protocol runs the statements of one text in
// order and stops at the first that fails (PostgreSQL documentation, "Message Flow: Simple Query").
let db: DataSource;

beforeAll(async () => {
  db = await openTestDatabase();
});
afterAll(async () => {
  await db.destroy();
});

/** An audit row marked with `marker` (the server's role may insert audit rows, never change them). */
const auditRow = (marker: string) =>
  `INSERT INTO audit_event (actor_name, action, entity_type, outcome, detail) VALUES ('Transaction test', 'test', 'test', 'success', jsonb_build_object('marker', ${sqlLiteral(marker)}))`;
const auditRowsWith = async (marker: string) =>
  Number((await db.query(`SELECT count(*) AS n FROM audit_event WHERE detail->>'marker' = $1`, [marker]))[0].n);

describe('inPooledTransaction', () => {
  it('hands over the opening statement’s rows and commits with the last statement', async () => {
    const marker = randomUUID();
    const result = await inPooledTransaction(db, `SELECT ${sqlLiteral(marker)} AS marker, 2 + 2 AS four`, async ({ client, opened, commitWith }) => {
      expect(opened).toEqual([{ marker, four: 4 }]);
      await client.query(auditRow(marker));
      await commitWith(auditRow(marker));
      return 'done';
    });
    expect(result).toBe('done');
    expect(await auditRowsWith(marker)).toBe(2);
  });

  it('commits nothing when the last statement fails, and leaves its connection usable', async () => {
    const marker = randomUUID();
    await expect(
      inPooledTransaction(db, 'SELECT 1', async ({ client, commitWith }) => {
        await client.query(auditRow(marker));
        await commitWith('SELECT 1 / 0'); // division_by_zero: COMMIT, sent with it, is not run
      }),
    ).rejects.toMatchObject({ code: '22012' });
    expect(await auditRowsWith(marker)).toBe(0);
    // Every connection of the pool is out of any transaction: a new one on each commits as usual.
    const size = poolOf(db).totalCount;
    const again = randomUUID();
    for (let i = 0; i < size; i++) await inPooledTransaction(db, 'SELECT 1', async ({ client }) => void (await client.query(auditRow(again))));
    expect(await auditRowsWith(again)).toBe(size);
  });

  it('commits nothing when the opening statement fails', async () => {
    const marker = randomUUID();
    let ran = false;
    await expect(inPooledTransaction(db, `SELECT ${sqlLiteral('not a uuid')}::uuid`, async () => void (ran = true))).rejects.toMatchObject({ code: '22P02' });
    expect(ran).toBe(false);
    await inPooledTransaction(db, 'SELECT 1', async ({ client }) => void (await client.query(auditRow(marker))));
    expect(await auditRowsWith(marker)).toBe(1);
  });

  it('writes text and bytes as literals that read back exactly', async () => {
    const bytes = Buffer.from([0, 1, 0x27, 0x5c, 0xff, 0x0a]); // NUL, a quote, a backslash, 0xFF, a newline
    const text = `O'Brien \\ "x" ; DROP TABLE study; --`;
    const [row] = await db.query(`SELECT ${sqlLiteral(bytes)} AS bytes, ${sqlLiteral(text)} AS text`);
    expect(Buffer.compare(row.bytes, bytes)).toBe(0);
    expect(row.text).toBe(text);
  });
});
