/**
 * Worklist under load beside a bare Express + pg `SELECT 1` route (the ceiling of this machine's
 * HTTP + database round trip) and the worklist's own statement behind that bare route (what its
 * database work alone allows), measured with autocannon in one run. Not a test: it prints numbers.
 * Target: worklist ≥ 25% of the bare route's requests per second, p99 < 100 ms.
 */
import type { AddressInfo } from 'node:net';
import { createServer } from 'node:http';
import { execFile } from 'node:child_process';
import { readFileSync, writeFileSync } from 'node:fs';
import { cpus, loadavg } from 'node:os';
import path from 'node:path';
import type { DataSource } from 'typeorm';
import { Session } from 'node:inspector/promises';
import type autocannon from 'autocannon';
import express from 'express';
import pg from 'pg';
import { prepareDatabase } from '../server/cli/prepare-database';
import { createDataSource } from '../server/db/data-source';
import { median } from './bench-timing';
import { worklistPageJson } from '../server/studies/worklist';
import { worklistQuerySchema } from '../shared/study/worklist';
import { signIn, startStack } from '../tests/support/stack';

const CONNECTIONS = Number(process.env.BENCH_CONNECTIONS ?? 50);
const SECONDS = Number(process.env.BENCH_SECONDS ?? 10);
const ROUNDS = Number(process.env.BENCH_ROUNDS ?? 1);
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

interface Target {
  name: string;
  url: string;
  headers: Record<string, string>;
  rounds: { result: autocannon.Result; serverCpuMs: number; dbCpuMs: number }[];
}


/**
 * Per target over its rounds: requests per second (mean), median p50 and p99, the worst p99, and the
 * CPU spent per request by this process (the servers) and by the database's backends.
 */
function summary(t: Target) {
  const requests = t.rounds.reduce((n, r) => n + r.result.requests.total, 0);
  return {
    name: t.name,
    reqPerSec: Math.round(t.rounds.reduce((n, r) => n + r.result.requests.average, 0) / t.rounds.length),
    p50ms: median(t.rounds.map((r) => r.result.latency.p50)),
    p99ms: median(t.rounds.map((r) => r.result.latency.p99)),
    worstP99ms: Math.max(...t.rounds.map((r) => r.result.latency.p99)),
    nodeCpuMsPerReq: +(t.rounds.reduce((n, r) => n + r.serverCpuMs, 0) / requests).toFixed(3),
    dbCpuMsPerReq: +(t.rounds.reduce((n, r) => n + r.dbCpuMs, 0) / requests).toFixed(3),
    errors: t.rounds.reduce((n, r) => n + r.result.errors + r.result.timeouts, 0),
    non2xx: t.rounds.reduce((n, r) => n + r.result.non2xx, 0),
    requests,
  };
}

/** CPU time (ms) used so far by each PostgreSQL backend serving this database (from /proc; none where it cannot be read). */
async function backendCpuMs(pool: pg.Pool): Promise<Map<number, number>> {
  const { rows } = await pool.query<{ pid: number }>(`SELECT pid FROM pg_stat_activity WHERE datname = current_database()`);
  const tick = 100; // USER_HZ on Linux
  const byPid = new Map<number, number>();
  for (const { pid } of rows) {
    try {
      const fields = readFileSync(`/proc/${pid}/stat`, 'utf8').split(') ')[1].split(' ');
      byPid.set(pid, ((Number(fields[11]) + Number(fields[12])) * 1000) / tick); // utime, stime
    } catch {
      /* gone, or another machine */
    }
  }
  return byPid;
}

/** CPU time the backends used between two readings (a backend that began in between counts whole). */
const cpuBetween = (before: Map<number, number>, after: Map<number, number>) => [...after].reduce((ms, [pid, t]) => ms + t - (before.get(pid) ?? 0), 0);

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
  // The worklist's own statement (page, its audit row, the JSON) behind the same bare Express: no
  // session, no middleware. The floor the full route stands on: what the database work alone allows.
  const statementDs = createDataSource(databaseUrl, 10);
  await statementDs.initialize();
  const viewer = { actorUserId: null, actorName: 'Load benchmark', actorRole: 'staff', clientAddress: '127.0.0.1' };
  bare.get('/worklist-statement', async (_req, res) => {
    res.type('application/json').send(await worklistPageJson(statementDs, worklistQuerySchema.parse({}), viewer));
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

  // BENCH_BASELINE=<folder>: an earlier checkout of this repository (bench-load.sh fills it from
  // BENCH_BASELINE_REF), served beside this one on the same database, so before and after are
  // measured in the same run, under the same load.
  const baselineDir = process.env.BENCH_BASELINE;
  let baseline: { url: string; cookie: string; close(): Promise<void> } | null = null;
  if (baselineDir) {
    const { createDataSource: baselineDataSource } = await import(path.join(baselineDir, 'server/db/data-source.ts'));
    const { startStack: baselineStack, signIn: baselineSignIn } = await import(path.join(baselineDir, 'tests/support/stack.ts'));
    const bds: DataSource = baselineDataSource(databaseUrl, 10);
    await bds.initialize();
    const bstack = await baselineStack(bds);
    const { cookie: bcookie } = await baselineSignIn(bstack, 'ivarga');
    baseline = { url: bstack.url, cookie: bcookie, close: async () => (await bstack.close(), await bds.destroy()) };
  }

  // autocannon in its own process, so the load generator does not share the servers' event loop.
  const run = (url: string, headers: Record<string, string> = {}, connections = CONNECTIONS, seconds = SECONDS) =>
    new Promise<autocannon.Result>((resolve, reject) => {
      const args = ['-j', '-c', String(connections), '-d', String(seconds), ...Object.entries(headers).flatMap(([k, v]) => ['-H', `${k}=${v}`]), url];
      execFile('node_modules/.bin/autocannon', args, { maxBuffer: 16 * 1024 * 1024 }, (error, stdout) => (error ? reject(error) : resolve(JSON.parse(stdout))));
    });

  const targets: Target[] = [
    { name: 'bare Express + pg SELECT 1', url: bareUrl, headers: {}, rounds: [] },
    { name: 'bare Express + the worklist statement', url: bareUrl.replace('/select1', '/worklist-statement'), headers: {}, rounds: [] },
    ...(baseline ? [{ name: `worklist before (${process.env.BENCH_BASELINE_REF ?? 'baseline'})`, url: `${baseline.url}/api/studies`, headers: { cookie: baseline.cookie }, rounds: [] }] : []),
    { name: 'worklist GET /api/studies (session, query, audit)', url: `${stack.url}/api/studies`, headers: { cookie }, rounds: [] },
  ];
  // Warm each, then measure them in turn, ROUNDS times over, so a change in the machine's load
  // falls on every target alike.
  for (const t of targets) await run(t.url, t.headers, 10, 2);
  const load = [loadavg()];
  const profiler = process.env.BENCH_PROFILE ? new Session() : null;
  for (let round = 0; round < ROUNDS; round++) {
    for (const t of targets) {
      const profiling = profiler && round === 0 && t === targets[targets.length - 1];
      if (profiling) {
        // BENCH_PROFILE=file.cpuprofile: the server's CPU profile over the first measured worklist run.
        profiler.connect();
        await profiler.post('Profiler.enable');
        await profiler.post('Profiler.start');
      }
      const cpu0 = process.cpuUsage();
      const db0 = await backendCpuMs(pool);
      const result = await run(t.url, t.headers);
      const cpu = process.cpuUsage(cpu0);
      const dbMs = cpuBetween(db0, await backendCpuMs(pool));
      t.rounds.push({ result, serverCpuMs: (cpu.user + cpu.system) / 1000, dbCpuMs: dbMs });
      if (profiling) {
        const { profile } = await profiler.post('Profiler.stop');
        writeFileSync(process.env.BENCH_PROFILE!, JSON.stringify(profile));
        profiler.disconnect();
      }
    }
    load.push(loadavg());
  }

  console.log(`${CONNECTIONS} connections, ${ROUNDS} rounds of ${SECONDS} s per target, ${STUDIES} studies, ${cpus().length} cores`);
  console.log(`load average (1 min) before and after each round: ${load.map((l) => l[0].toFixed(1)).join(', ')}`);
  const rows = targets.map(summary);
  console.table(rows);
  const bareRow = rows[0];
  for (const row of rows.slice(1)) {
    const targets = row.name.startsWith('worklist GET') ? ' (target ≥ 25%)' : '';
    console.log(`${row.name} / bare: ${((row.reqPerSec / bareRow.reqPerSec) * 100).toFixed(0)}%${targets}, p99 ${row.p99ms} ms${targets ? ' (target < 100 ms)' : ''}`);
  }

  await stack.close();
  await baseline?.close();
  await ds.destroy();
  await statementDs.destroy();
  bareServer.close();
  await pool.end();
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
