import http from 'node:http';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { createDataSource } from '../../server/db/data-source';
import { prepareDatabase } from '../../server/cli/prepare-database';
import { createPrivateCluster, type PrivateCluster } from '../support/pg-cluster';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

// A real PostgreSQL stopped and started while requests are in flight: every answer is either a
// normal one or 503 problem+json with Retry-After (RFC 9110 §15.6.4, §10.2.3), no connection is
// dropped, health says the database is down, and every session is still valid afterwards.

let cluster: PrivateCluster;
let db: DataSource;
let stack: TestStack;
const cookies: Record<string, string> = {};
const roles = ['staff', 'physician', 'coder', 'chief', 'admin'] as const;

beforeAll(async () => {
  cluster = await createPrivateCluster('outage-pg');
  cluster.psql(`CREATE ROLE isobar_owner LOGIN`);
  cluster.psql(`CREATE ROLE isobar LOGIN`);
  cluster.psql(`CREATE DATABASE isobar OWNER isobar_owner`);
  await prepareDatabase(cluster.url('isobar', 'isobar_owner'), cluster.url('isobar', 'isobar'));
  db = createDataSource(cluster.url('isobar', 'isobar'), 4);
  await db.initialize();
  stack = await startStack(db);
  for (const role of roles) cookies[role] = (await signIn(stack, usernameOf(role))).cookie;
}, 120_000);

afterAll(async () => {
  await stack?.close();
  await db?.destroy().catch(() => undefined);
  cluster?.remove();
});

/**
 * One request on its own connection (no keep-alive), so a closed socket can only mean the server
 * dropped this request; a pooled client could instead meet the ordinary close of an idle
 * keep-alive connection (RFC 9112 §9.8), which says nothing about the outage.
 */
function get(path: string, cookie: string): Promise<{ status: number; retryAfter: string | null; type: string | null }> {
  const url = new URL(stack.url + path);
  return new Promise((resolve, reject) => {
    const req = http.get({ host: url.hostname, port: url.port, path: url.pathname + url.search, headers: { cookie }, agent: false, timeout: 15_000 }, (res) => {
      res.resume();
      res.on('end', () => resolve({ status: res.statusCode ?? 0, retryAfter: (res.headers['retry-after'] as string | undefined) ?? null, type: res.headers['content-type'] ?? null }));
      res.on('error', reject);
    });
    req.on('timeout', () => req.destroy(new Error('no answer within 15 s')));
    req.on('error', reject);
  });
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

interface Seen {
  status: number;
  retryAfter: string | null;
  type: string | null;
  path: string;
}

describe('a database outage under load', () => {
  it('answers 503 with Retry-After while PostgreSQL is down, drops no connection and ends no session', async () => {
    const endedBefore = (await db.query(`SELECT count(*)::int AS n FROM http_session_ended`))[0].n;
    const seen: Seen[] = [];
    const dropped: string[] = [];
    let running = true;
    const t0 = Date.now();
    const paths = ['/api/studies', '/api/me', '/api/studies?q=Lind', '/api/health'];
    const worker = async (i: number) => {
      const role = roles[i % roles.length];
      for (let n = 0; running && n < 2000; n++) {
        const mine = role === 'admin' ? ['/api/me', '/api/health'] : paths; // an administrator reads no studies
        const path = mine[(i + n) % mine.length];
        try {
          const res = await get(path, cookies[role]);
          seen.push({ status: res.status, retryAfter: res.retryAfter, type: res.type, path });
        } catch (error) {
          dropped.push(`${path}: ${(error as Error).message} at ${Date.now() - t0} ms`);
        }
        await sleep(15);
      }
    };
    const workers = Array.from({ length: 8 }, (_, i) => worker(i));

    await sleep(600);
    cluster.stop();
    await sleep(1500);
    const health = await fetch(`${stack.url}/api/health`);
    const healthBody = await health.json();
    await sleep(1000);
    cluster.start();
    // Back: wait (bounded) until the pool has reconnected.
    for (let i = 0; i < 50 && (await fetch(`${stack.url}/api/health`)).status !== 200; i++) await sleep(100);
    await sleep(800);
    running = false;
    await Promise.all(workers);

    expect(health.status).toBe(503);
    expect(health.headers.get('retry-after')).toMatch(/^\d+$/);
    expect(healthBody).toMatchObject({ status: 503, database: 'down' });

    expect(dropped).toEqual([]);
    const statuses = new Set(seen.map((s) => s.status));
    expect([...statuses].filter((s) => s !== 200 && s !== 503)).toEqual([]);
    const unavailable = seen.filter((s) => s.status === 503);
    expect(unavailable.length).toBeGreaterThan(0);
    for (const s of unavailable) {
      expect(s.retryAfter).toMatch(/^\d+$/);
      expect(s.type).toMatch(/^application\/problem\+json/);
    }
    expect(seen.filter((s) => s.status === 200).length).toBeGreaterThan(unavailable.length / 10);

    // Every session that was active during the outage is still valid.
    for (const role of roles) {
      const res = await fetch(`${stack.url}/api/me`, { headers: { cookie: cookies[role] } });
      expect({ role, status: res.status }).toEqual({ role, status: 200 });
    }
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM http_session_ended`);
    expect(n).toBe(endedBefore);
  }, 60_000);
});
