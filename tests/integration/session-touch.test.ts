import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { openTestDatabase } from '../support/app';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

// The idle expiry is written only when it moves by more than a tenth of the idle limit, so a
// burst of reads costs no session writes (common practice for rolling sessions).

let db: DataSource;
let stack: TestStack;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db, { session: { idleMinutes: 30, maxHours: 12, secure: false } });
});
afterAll(async () => {
  await stack.close();
  await db.destroy();
});

const sidOf = (cookie: string) => decodeURIComponent(cookie).match(/isobar\.sid=s:([^.;]+)/)![1];
const expiryOf = async (sid: string) => ((await db.query(`SELECT expire FROM http_session WHERE sid = $1`, [sid]))[0].expire as Date).getTime();

describe('rolling idle expiry', () => {
  it('leaves the stored expiry alone while it would move less than a tenth of the idle limit', async () => {
    const { cookie } = await signIn(stack, usernameOf('staff'));
    const sid = sidOf(cookie);
    const first = await expiryOf(sid);
    for (let i = 0; i < 5; i++) {
      const res = await fetch(`${stack.url}/api/me`, { headers: { cookie } });
      expect(res.status).toBe(200);
      await res.arrayBuffer();
    }
    expect(await expiryOf(sid)).toBe(first);
  });

  it('moves it once it would move materially (more than 3 of 30 minutes)', async () => {
    const { cookie } = await signIn(stack, usernameOf('physician'));
    const sid = sidOf(cookie);
    // As if the last write was 10 minutes ago.
    await db.query(`UPDATE http_session SET expire = expire - interval '10 minutes' WHERE sid = $1`, [sid]);
    const before = await expiryOf(sid);
    const res = await fetch(`${stack.url}/api/me`, { headers: { cookie } });
    await res.arrayBuffer();
    expect(res.status).toBe(200);
    const after = await expiryOf(sid);
    expect(after - before).toBeGreaterThan(9 * 60_000);
    expect(after).toBeLessThanOrEqual(Date.now() + 30 * 60_000 + 1000);
  });
});
