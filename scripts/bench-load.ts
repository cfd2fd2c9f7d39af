/**
 * Worklist under load beside a bare Express + pg `SELECT 1` route (the ceiling of this machine's
 * HTTP + database round trip), measured with autocannon in one run. Not a test: it prints numbers.
 * Target: worklist ≥ 25% of the bare route's requests per second, p99 < 100 ms.
 */
import type { AddressInfo } from 'node:net';
import { createServer } from 'node:http';
import { execFile } from 'node:child_process';
import type autocannon from 'autocannon';
import express from 'express';
import pg from 'pg';
import { prepareDatabase } from '../server/cli/prepare-database';
import { createDataSource } from '../server/db/data-source';
import { signIn, startStack } from '../tests/support/stack';

const CONNECTIONS = Number(process.env.BENCH_CONNECTIONS ?? 50);
const SECONDS = Number(process.env.BENCH_SECONDS ?? 10);
const STUDIES = Number(process.env.BENCH_STUDIES ?? 5000);
const databaseUrl = process.env.DATABASE_URL!;

async function seed(): Promise<void> {
  const ds = createDataSource(databaseUrl, 2);
  await ds.initialize();
  await ds.query(
    `INSERT INTO patient (mrn, family_name, given_name, birth_date, sex)
     SELECT 'LP-' || lpad(i::text, 6, '0'), 'Family' || (i % 997), 'Given' || (i % 113), date '1940-01-01' + (i % 20000), 'female'
     FROM generate_series(1, $1::int) i`,
    [STUDIES],
  );
  await ds.query(
    `INSERT INTO study (accession, patient_id, state, procedure_started_at, procedure_ended_at, indication)
     SELECT 'LOAD-' || p.mrn, p.id, CASE WHEN random() < 0.2 THEN 'draft' ELSE 'awaiting-signature' END,
            now() - random() * interval '900 days', now() - random() * interval '899 days', 'Angina, intermediate lesion'
     FROM patient p WHERE p.mrn LIKE 'LP-%'`,
  );
  await ds.query(`ANALYZE`).catch(() => undefined); // the server's role may not analyse every table; statistics are a nicety here
  await ds.destroy();
}

function summary(name: string, r: autocannon.Result) {
  return {
    name,
    reqPerSec: Math.round(r.requests.average),
    p50ms: r.latency.p50,
    p99ms: r.latency.p99,
    errors: r.errors + r.timeouts,
    non2xx: r.non2xx,
    requests: r.requests.total,
  };
}

async function main(): Promise<void> {
  await prepareDatabase(process.env.MIGRATION_DATABASE_URL!, databaseUrl);
  await seed();

  // The bare route: Express and one pg pool of the same size as the app's, SELECT 1 per request.
  const pool = new pg.Pool({ connectionString: databaseUrl, max: 10 });
  const bare = express();
  bare.get('/select1', async (_req, res) => {
    const { rows } = await pool.query('SELECT 1 AS one');
    res.json(rows[0]);
  });
  const bareServer = createServer(bare);
  await new Promise<void>((resolve) => bareServer.listen(0, '127.0.0.1', resolve));
  const bareUrl = `http://127.0.0.1:${(bareServer.address() as AddressInfo).port}/select1`;

  const ds = createDataSource(databaseUrl, 10);
  await ds.initialize();
  const stack = await startStack(ds);
  const { cookie } = await signIn(stack, 'ivarga').catch(async () => {
    throw new Error('sign-in failed');
  });

  // autocannon in its own process, so the load generator does not share the servers' event loop.
  const run = (url: string, headers: Record<string, string> = {}, connections = CONNECTIONS, seconds = SECONDS) =>
    new Promise<autocannon.Result>((resolve, reject) => {
      const args = ['-j', '-c', String(connections), '-d', String(seconds), ...Object.entries(headers).flatMap(([k, v]) => ['-H', `${k}=${v}`]), url];
      execFile('node_modules/.bin/autocannon', args, { maxBuffer: 16 * 1024 * 1024 }, (error, stdout) => (error ? reject(error) : resolve(JSON.parse(stdout))));
    });
  // Warm both, then measure one after the other in the same run.
  await run(bareUrl, {}, 10, 2);
  await run(`${stack.url}/api/studies`, { cookie }, 10, 2);
  const bareResult = summary('bare Express + pg SELECT 1', await run(bareUrl));
  const worklistResult = summary('worklist GET /api/studies (session, query, audit)', await run(`${stack.url}/api/studies`, { cookie }));

  console.log(`${CONNECTIONS} connections, ${SECONDS} s each, ${STUDIES} studies`);
  console.table([bareResult, worklistResult]);
  const ratio = worklistResult.reqPerSec / bareResult.reqPerSec;
  console.log(`worklist / bare: ${(ratio * 100).toFixed(0)}% (target ≥ 25%), worklist p99 ${worklistResult.p99ms} ms (target < 100 ms)`);

  await stack.close();
  await ds.destroy();
  bareServer.close();
  await pool.end();
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
