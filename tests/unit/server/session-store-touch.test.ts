import { describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { createSessionStore } from '../../../server/auth/session';
import { loadConfig } from '../../../server/config';
import { createLogger } from '../../../server/log';

// The idle expiry is written only when it would move by more than a tenth of the idle limit (the
// store's rule, DEVELOPERS.md "Outages" and "Sessions"); these check that rule when one session has
// several requests in flight at once, against a stand-in pool that records each statement.

const idleMinutes = 30; // common practice: the default idle limit of SESSION_IDLE_MINUTES
const minute = 60_000;

function storeWithPool(storedExpiryMs: number, failUpdates = false) {
  const statements: string[] = [];
  const pool = {
    query(q: string | { text: string }, _values?: unknown[]) {
      const text = typeof q === 'string' ? q : q.text;
      statements.push(text.trim().split(/\s+/)[0]);
      if (text.startsWith('SELECT sess')) return Promise.resolve({ rows: [{ sess: { cookie: {} }, expire_ms: String(storedExpiryMs) }] });
      if (text.startsWith('UPDATE') && failUpdates) return Promise.reject(Object.assign(new Error('Connection terminated'), { code: 'ECONNRESET' }));
      return Promise.resolve({ rows: [] });
    },
    on() {},
  };
  const config = { ...loadConfig({ NODE_ENV: 'test' }), session: { ...loadConfig({ NODE_ENV: 'test' }).session, idleMinutes } };
  const store = createSessionStore(config, { driver: { master: pool } } as unknown as DataSource, createLogger('silent'));
  const get = (sid: string) => new Promise<void>((ok, fail) => store.get(sid, (err) => (err ? fail(err) : ok())));
  const touch = (sid: string, expiresMs: number) =>
    new Promise<unknown>((ok) => store.touch!(sid, { cookie: { expires: new Date(expiresMs) } } as never, (err?: unknown) => ok(err)));
  const updates = () => statements.filter((s) => s === 'UPDATE').length;
  return { get, touch, updates };
}

describe('the stored idle expiry under parallel requests of one session', () => {
  it('is written once when it moves materially, not once per request in flight', async () => {
    const stored = Date.now() + (idleMinutes - 10) * minute; // last written 10 minutes ago
    const { get, touch, updates } = storeWithPool(stored);
    // Four requests read the session before any of them ends…
    await Promise.all([get('sid-1'), get('sid-1'), get('sid-1'), get('sid-1')]);
    // …then each ends, moving the expiry to about now + 30 minutes.
    for (let i = 0; i < 4; i++) await touch('sid-1', Date.now() + idleMinutes * minute + i);
    expect(updates()).toBe(1);
  });

  it('is not written at all while it would move by less than a tenth of the idle limit', async () => {
    const { get, touch, updates } = storeWithPool(Date.now() + (idleMinutes - 1) * minute);
    await Promise.all([get('sid-2'), get('sid-2')]);
    await touch('sid-2', Date.now() + idleMinutes * minute);
    await touch('sid-2', Date.now() + idleMinutes * minute);
    expect(updates()).toBe(0);
  });

  it('is tried again by the next request when a write failed', async () => {
    const { get, touch, updates } = storeWithPool(Date.now() + (idleMinutes - 10) * minute, true);
    await get('sid-3');
    expect(await touch('sid-3', Date.now() + idleMinutes * minute)).toBeTruthy();
    await touch('sid-3', Date.now() + idleMinutes * minute);
    expect(updates()).toBe(2);
  });
});
