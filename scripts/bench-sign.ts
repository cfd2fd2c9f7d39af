// Benchmark: POST /api/studies/:id/sign through HTTP with a real session, 200 signatures one after
// another, then 200 more 20 at a time. Prints p50/p95 of the whole request and of the PDF step inside
// it (timed by the renderer itself, see pdfRenderedChannel), and signatures per second. After the
// sequential run it prints where a signature's time goes: the steps of signStudy (signStepsChannel;
// `pdf` is the wait for the rendering thread, whose render alone is the PDF step), and the rest of the request outside signStudy
// (the client — Node's http on a kept-open connection —, HTTP, session, origin and access checks,
// body parsing, the answer).
// Run: bash scripts/bench-sign.sh (makes the database and sets DATABASE_URL).
// Exits 1 when the sequential run misses a target: p95 < 250 ms, whole request ≤ 1.5 × the PDF step.
// BENCH_SIGN_PROFILE=FILE writes a CPU profile of the sequential run (open it in a browser's devtools).
import diagnosticsChannel from 'node:diagnostics_channel';
import { writeFileSync } from 'node:fs';
import http from 'node:http';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { Session } from 'node:inspector/promises';
import os from 'node:os';
import { createDataSource } from '../server/db/data-source';
import { prepareDatabase } from '../server/cli/prepare-database';
import { demoStudies } from '../server/demo/scenario';
import { pdfRenderedChannel } from '../server/report-document/pdf';
import { signStepsChannel } from '../server/reports/sign-study';
import type { StudyRecord } from '../shared/study/schema';
import { studyLikeDemo } from '../tests/support/reports';
import { signIn, startStack, usernameOf } from '../tests/support/stack';
import { summary } from './bench-timing';

const SEQUENTIAL = Number(process.env.BENCH_SIGN_SEQUENTIAL ?? 200);
const CONCURRENT = Number(process.env.BENCH_SIGN_CONCURRENT ?? 200);
const AT_ONCE = 20;
const WARM_UP = 5;
const TARGET_P95_MS = 250;
const TARGET_RATIO = 1.5;

const databaseUrl = process.env.DATABASE_URL;
if (!databaseUrl || !/\/isobar_bench_sign$/.test(databaseUrl)) {
  console.error('DATABASE_URL must point at the isobar_bench_sign database: run bash scripts/bench-sign.sh');
  process.exit(2);
}

const f = (ms: number) => ms.toFixed(1).padStart(7);

/** Runs `fn` over `items` with at most `limit` at once. */
async function pool<T>(items: T[], limit: number, fn: (item: T) => Promise<void>): Promise<void> {
  let next = 0;
  await Promise.all(Array.from({ length: Math.min(limit, items.length) }, async () => {
    while (next < items.length) await fn(items[next++]);
  }));
}

const agent = new http.Agent({ keepAlive: true, maxSockets: 32 });

/** POST `body` as JSON; the answer's status and parsed body. */
function post(url: string, body: string, headers: Record<string, string>): Promise<{ status: number; body: unknown }> {
  return new Promise((resolve, reject) => {
    const req = http.request(url, { method: 'POST', agent, headers: { ...headers, 'content-type': 'application/json', 'content-length': Buffer.byteLength(body) } }, (res) => {
      let text = '';
      res.setEncoding('utf8');
      res.on('data', (chunk: string) => (text += chunk));
      res.on('end', () => {
        let parsed: unknown = text; // an answer that is not JSON (a proxy's error page) is kept as text
        try {
          parsed = JSON.parse(text);
        } catch {
          /* kept as text */
        }
        resolve({ status: res.statusCode ?? 0, body: parsed });
      });
      res.on('error', reject);
    });
    req.on('error', reject);
    req.end(body);
  });
}

async function main(): Promise<void> {
  await prepareDatabase(process.env.MIGRATION_DATABASE_URL!, databaseUrl!);
  const ds = createDataSource(databaseUrl!, 10);
  await ds.initialize();
  // The session is confirmed once; a long benchmark must not run into the signing re-authentication.
  const stack = await startStack(ds, { signReauthMinutes: 720 });
  try {
    const [pg] = await ds.query(`SELECT current_setting('server_version') AS v, current_setting('fsync') AS fsync, current_setting('synchronous_commit') AS sc`);
    console.log(`Node ${process.version}, ${os.cpus().length} CPUs (${os.cpus()[0]?.model ?? '?'}), load ${os.loadavg()[0].toFixed(2)}; PostgreSQL ${pg.v}, fsync ${pg.fsync}, synchronous_commit ${pg.sc}`);
    const staff = (await signIn(stack, usernameOf('staff'))).cookie;
    const physician = (await signIn(stack, usernameOf('physician'))).cookie;

    // The complete demo cases (a lesion study, a multivessel lesion study, a full coronary function
    // work-up with acetylcholine), in turn.
    const kinds = demoStudies.filter((d) => d.state === 'signed' || d.state === 'amended');
    const total = WARM_UP + SEQUENTIAL + CONCURRENT;
    const began = performance.now();
    const studies: StudyRecord[] = new Array(total);
    await pool([...Array(total).keys()], 4, async (i) => {
      studies[i] = await studyLikeDemo(stack.url, staff, kinds[i % kinds.length]);
    });
    console.log(`made ${total} complete studies (${kinds.map((k) => k.accession).join(', ')} in turn) in ${((performance.now() - began) / 1000).toFixed(1)} s`);

    const pdfTimes: number[] = [];
    const pdfCpu: number[] = [];
    const onPdf = (message: unknown) => {
      const m = message as { durationMs: number; cpuMs: number | null };
      pdfTimes.push(m.durationMs);
      if (m.cpuMs !== null) pdfCpu.push(m.cpuMs);
    };
    diagnosticsChannel.subscribe(pdfRenderedChannel.name, onPdf);
    const steps: Array<{ spans: Record<string, number>; totalMs: number }> = [];
    const onSteps = (message: unknown) => void steps.push(message as { spans: Record<string, number>; totalMs: number });
    diagnosticsChannel.subscribe(signStepsChannel.name, onSteps);
    // The server's own time per signature: request received → answer written (Node's HTTP channels),
    // without the client's share of the round trip.
    const serverTimes: number[] = [];
    const arrived = new WeakMap<object, number>();
    const onStart = (m: unknown) => {
      const { request } = m as { request: { method?: string; url?: string } };
      if (request.method === 'POST' && request.url?.endsWith('/sign')) arrived.set(request, performance.now());
    };
    const onFinish = (m: unknown) => {
      const { request } = m as { request: object };
      const t = arrived.get(request);
      if (t !== undefined) serverTimes.push(performance.now() - t);
    };
    diagnosticsChannel.subscribe('http.server.request.start', onStart);
    diagnosticsChannel.subscribe('http.server.response.finish', onFinish);
    const signCpu: number[] = [];
    const sign = async (study: StudyRecord): Promise<number> => {
      const t = performance.now();
      const cpu = process.cpuUsage();
      // Node's own HTTP client on a kept-open connection, as a browser keeps one: the client's share of
      // the request stays small (Node's fetch costs 0.2–0.4 ms more per request on this machine).
      const { status, body } = await post(`${stack.url}/api/studies/${study.id}/sign`, JSON.stringify({ version: study.version }), {
        cookie: physician,
        origin: stack.url,
      });
      const ms = performance.now() - t;
      const used = process.cpuUsage(cpu);
      signCpu.push((used.user + used.system) / 1000);
      if (status !== 201) throw new Error(`sign answered ${status}: ${JSON.stringify(body).slice(0, 300)}`);
      return ms;
    };

    for (const s of studies.slice(0, WARM_UP)) await sign(s);
    const run = async (label: string, batch: StudyRecord[], atOnce: number) => {
      pdfTimes.length = 0;
      serverTimes.length = 0;
      pdfCpu.length = 0;
      signCpu.length = 0;
      steps.length = 0;
      const times: number[] = [];
      // How late the event loop runs its callbacks meanwhile: what any other request waits for.
      const loopDelay = monitorEventLoopDelay({ resolution: 1 });
      loopDelay.enable();
      const t = performance.now();
      await pool(batch, atOnce, async (s) => void times.push(await sign(s)));
      loopDelay.disable();
      const seconds = (performance.now() - t) / 1000;
      const whole = summary(times);
      const pdf = summary(pdfTimes);
      console.log(`${label.padEnd(30)} ${f(whole.p50)} ${f(whole.p95)} ${f(whole.max)}  | ${f(pdf.p50)} ${f(pdf.p95)} ${f(pdf.max)}  | ${(batch.length / seconds).toFixed(1).padStart(6)}   ${(whole.p50 / pdf.p50).toFixed(2)} / ${(whole.p95 / pdf.p95).toFixed(2)}`);
      const server = summary(serverTimes);
      console.log(`${'  (server: received → answered)'.padEnd(30)} ${f(server.p50)} ${f(server.p95)} ${f(server.max)}  |                           |          ${(server.p50 / pdf.p50).toFixed(2)} / ${(server.p95 / pdf.p95).toFixed(2)}`);
      console.log(`${'  (event loop delay)'.padEnd(30)} ${f(loopDelay.percentile(50) / 1e6)} ${f(loopDelay.percentile(99) / 1e6)} ${f(loopDelay.max / 1e6)}  (p50, p99, max: how long any other request's callback waited)`);
      if (atOnce === 1) {
        // CPU time of this process per signature (client, server and the PDF thread; PostgreSQL
        // apart) — less sensitive than the clock to other programs sharing the machine. A PDF rendered
        // in a thread has no CPU time of its own to compare with (Node 20 measures the process only).
        const c = summary(signCpu);
        const p = pdfCpu.length ? summary(pdfCpu) : null;
        console.log(`${'  (CPU time of this process)'.padEnd(30)} ${f(c.p50)} ${f(c.p95)} ${f(c.max)}  | ${p ? `${f(p.p50)} ${f(p.p95)} ${f(p.max)}` : '    (in a thread)       '}  |          ${p ? `${(c.p50 / p.p50).toFixed(2)} / ${(c.p95 / p.p95).toFixed(2)}` : ''}`);
        // Where the time goes, per signature (ms): each step's p50 and p95 on its own.
        const names = Object.keys(steps[0]?.spans ?? {});
        const row = (name: string, xs: number[]) => {
          const x = summary(xs);
          return `    ${name.padEnd(26)} ${f(x.p50)} ${f(x.p95)}`;
        };
        console.log(`  steps (ms)                      p50     p95`);
        for (const n of names) console.log(row(n === 'report' ? 'report text (no PDF)' : n, steps.map((s) => s.spans[n])));
        console.log(row('  of which the PDF step', pdfTimes));
        console.log(row('signStudy in all', steps.map((s) => s.totalMs)));
        if (steps.length === times.length) console.log(row('outside signStudy', times.map((t, i) => t - steps[i].totalMs)));
      }
      return { whole, pdf, server };
    };
    console.log(`\n${WARM_UP} warm-up signatures, then the timed runs (ms); ratio = whole / PDF at p50 / p95`);
    console.log(`${'run'.padEnd(30)}   whole p50    p95     max  |   PDF p50    p95     max  | signs/s   ratio`);
    const profileFile = process.env.BENCH_SIGN_PROFILE;
    const inspector = profileFile ? new Session() : null;
    if (inspector) {
      inspector.connect();
      await inspector.post('Profiler.enable');
      await inspector.post('Profiler.start');
    }
    const seq = await run(`${SEQUENTIAL} one after another`, studies.slice(WARM_UP, WARM_UP + SEQUENTIAL), 1);
    if (inspector && profileFile) {
      const { profile } = await inspector.post('Profiler.stop');
      writeFileSync(profileFile, JSON.stringify(profile));
      inspector.disconnect();
      console.log(`  CPU profile of the sequential run: ${profileFile}`);
    }
    if (CONCURRENT > 0) await run(`${CONCURRENT}, ${AT_ONCE} at a time`, studies.slice(WARM_UP + SEQUENTIAL), AT_ONCE);
    diagnosticsChannel.unsubscribe(pdfRenderedChannel.name, onPdf);
    diagnosticsChannel.unsubscribe(signStepsChannel.name, onSteps);
    diagnosticsChannel.unsubscribe('http.server.request.start', onStart);
    diagnosticsChannel.unsubscribe('http.server.response.finish', onFinish);

    const checks = [
      { name: `sequential p95 ${seq.whole.p95.toFixed(1)} ms < ${TARGET_P95_MS} ms`, pass: seq.whole.p95 < TARGET_P95_MS },
      { name: `sequential whole p50 ${seq.whole.p50.toFixed(1)} ms ≤ ${TARGET_RATIO} × PDF p50 ${seq.pdf.p50.toFixed(1)} ms`, pass: seq.whole.p50 <= TARGET_RATIO * seq.pdf.p50 },
      { name: `sequential whole p95 ${seq.whole.p95.toFixed(1)} ms ≤ ${TARGET_RATIO} × PDF p95 ${seq.pdf.p95.toFixed(1)} ms`, pass: seq.whole.p95 <= TARGET_RATIO * seq.pdf.p95 },
    ];
    console.log('');
    for (const c of checks) console.log(`${c.pass ? 'PASS' : 'FAIL'}  ${c.name}`);
    if (checks.some((c) => !c.pass)) process.exitCode = 1;
  } finally {
    await stack.close();
    await ds.destroy();
    agent.destroy();
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
