import { randomUUID } from 'node:crypto';
import pg from 'pg';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import type { DataSource } from 'typeorm';
import { inPooledTransaction, poolOf, uuidLiteral } from '../../server/db/prepared';
import { openTestDatabase } from '../support/app';

// The transaction helper the signature runs on: an opening statement sent with BEGIN in one text
// query. PostgreSQL's simple query protocol runs the statements of one text in order and stops at the
// first that fails (PostgreSQL documentation, "Message Flow: Simple Query").
let db: DataSource;

beforeAll(async () => {
  db = await openTestDatabase();
});
afterAll(async () => {
  await db.destroy();
});

/** An audit row marked with `marker` (the server's role may insert audit rows, never change them). */
const auditRow = (client: { query: (text: string, values: unknown[]) => Promise<unknown> }, marker: string) =>
  client.query(`INSERT INTO audit_event (actor_name, action, entity_type, outcome, detail) VALUES ('Transaction test', 'test', 'test', 'success', jsonb_build_object('marker', $1::text))`, [marker]);
const auditRowsWith = async (marker: string) =>
  Number((await db.query(`SELECT count(*) AS n FROM audit_event WHERE detail->>'marker' = $1`, [marker]))[0].n);

describe('inPooledTransaction', () => {
  it('hands over the opening statement’s rows and commits what the work wrote', async () => {
    const marker = randomUUID();
    const sent = vi.spyOn(pg.Client.prototype, 'query');
    try {
      const result = await inPooledTransaction(db, `SELECT ${uuidLiteral(marker)} AS marker, 2 + 2 AS four`, async ({ client, opened }) => {
        expect(opened).toEqual([{ marker, four: 4 }]);
        await auditRow(client, marker);
        return 'done';
      });
      expect(result).toBe('done');
      // Three round trips: BEGIN with the opening statement, the work's statement, COMMIT.
      const texts = sent.mock.calls.map(([q]) => (typeof q === 'string' ? q : (q as { text: string }).text));
      expect(texts).toHaveLength(3);
      expect(texts[0]).toMatch(/^BEGIN; SET LOCAL idle_in_transaction_session_timeout = '60s'; SELECT '/);
      expect(texts[1]).toMatch(/^INSERT INTO audit_event/);
      expect(texts[2]).toBe('COMMIT');
    } finally {
      sent.mockRestore();
    }
    expect(await auditRowsWith(marker)).toBe(1);
  });

  it('ends a transaction left idle for longer than its limit (its locks go with it)', async () => {
    await inPooledTransaction(db, 'SELECT 1', async ({ client }) => {
      const [{ idle_in_transaction_session_timeout: limit }] = (await client.query('SHOW idle_in_transaction_session_timeout')).rows;
      expect(limit).toBe('1min');
    });
    // Only inside: a connection back in the pool has the server's default again.
    expect((await db.query('SHOW idle_in_transaction_session_timeout'))[0].idle_in_transaction_session_timeout).toBe('0');
  });

  it('commits nothing when the work fails, and leaves its connection usable', async () => {
    const marker = randomUUID();
    await expect(
      inPooledTransaction(db, 'SELECT 1', async ({ client }) => {
        await auditRow(client, marker);
        await client.query('SELECT 1 / 0'); // division_by_zero
      }),
    ).rejects.toMatchObject({ code: '22012' });
    expect(await auditRowsWith(marker)).toBe(0);
    // The connection went back to the pool out of any transaction: every pooled connection, taken at
    // once (so the failed one is among them), commits as usual.
    const size = poolOf(db).totalCount;
    const again = randomUUID();
    let held = 0;
    let releaseAll!: () => void;
    const allHeld = new Promise<void>((resolve) => (releaseAll = resolve));
    await Promise.all(
      Array.from({ length: size }, () =>
        inPooledTransaction(db, 'SELECT 1', async ({ client }) => {
          await auditRow(client, again);
          if (++held === size) releaseAll();
          await allHeld;
        }),
      ),
    );
    expect(await auditRowsWith(again)).toBe(size);
  });

  it('runs no work and commits nothing when the opening statement fails', async () => {
    const marker = randomUUID();
    let ran = false;
    await expect(inPooledTransaction(db, `SELECT 1 / 0`, async () => void (ran = true))).rejects.toMatchObject({ code: '22012' });
    expect(ran).toBe(false);
    await inPooledTransaction(db, 'SELECT 1', ({ client }) => auditRow(client, marker));
    expect(await auditRowsWith(marker)).toBe(1);
  });
});

describe('uuidLiteral', () => {
  it('writes a UUID as a uuid literal and refuses anything else', async () => {
    const id = randomUUID();
    const [row] = await db.query(`SELECT ${uuidLiteral(id)} AS id`);
    expect(row.id).toBe(id);
    for (const bad of [`${id}'; DROP TABLE study; --`, `${id}\n`, '', 'not-a-uuid', `${id.slice(0, 35)}\\`]) {
      expect(() => uuidLiteral(bad)).toThrow(TypeError);
    }
  });
});
