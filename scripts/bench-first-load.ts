// First load on a phone: the worklist of a signed-in lab staff user against a bare Expo Router app
// that shows a list, built with the same installed versions and served the same way (precompressed,
// through the same static handler). Both are measured side by side in one run, alternating, under
// Chromium's own phone throttling. Run: bash scripts/bench-first-load.sh (builds both, makes the
// database). Exits 1 when a target is missed.
import os from 'node:os';
import path from 'node:path';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import express from 'express';
import compression from 'compression';
import type { BrowserContext } from 'playwright-core';
import { createDataSource } from '../server/db/data-source';
import { prepareDatabase } from '../server/cli/prepare-database';
import { seedDemo } from '../server/demo/seed';
import { serveWebApp } from '../server/app';
import { launchBrowser, signInInBrowser, viewports } from '../tests/support/browser';
import { startStack } from '../tests/support/stack';
import { median } from './bench-timing';

const RUNS = Number(process.env.ISOBAR_BENCH_RUNS ?? 5);
const ROWS = 25;
/** Chromium's throttling for a mid-range phone on a fair mobile network. */
const phone = {
  cpuSlowdown: 4,
  network: { offline: false, latency: 60, downloadThroughput: 10e6 / 8, uploadThroughput: 5e6 / 8 },
} as const;
const TARGET_ROWS_RATIO = 1.25;
/** Steps of Isobar's first render, printed beside the total. */
const isobarMarks = {
  'session check shown': '[data-testid="session-loading"]',
  'signed-in frame shown': '[data-testid="signed-in-role"]',
  'worklist screen shown': '[data-testid="worklist-search"]',
};
const TARGET_JS_RATIO = 1.5;

const databaseUrl = process.env.DATABASE_URL;
const bareDist = process.env.ISOBAR_BARE_DIST;
if (!databaseUrl || !/\/isobar_firstload$/.test(databaseUrl) || !bareDist) {
  console.error('DATABASE_URL must point at the isobar_firstload database and ISOBAR_BARE_DIST at the bare build: run bash scripts/bench-first-load.sh');
  process.exit(2);
}

interface Sample {
  /** When the first list row was on screen (the animation frame after it entered the page), ms from navigation start. */
  firstRow: number;
  lcp: number;
  /** When each marked element first appeared, ms from navigation start. */
  marks: Record<string, number>;
  /** Scripts fetched before the first row, bytes on the wire (headers included). */
  jsBeforeRow: number;
  jsFiles: number;
  /** Every byte on the wire before the first row: page, scripts, fonts, API answers. */
  allBeforeRow: number;
  requests: { name: string; start: number; end: number; bytes: number }[];
}

/**
 * Records in the page when the first element matching `selector` reaches the screen (and when each of
 * the `marks` first appears, to show where the time goes), and the LCP.
 */
function probe(selector: string, marks: Record<string, string>): string {
  return `(() => {
    const w = window;
    w.__lcp = 0;
    w.__marks = {};
    try {
      new PerformanceObserver((list) => { for (const e of list.getEntries()) w.__lcp = e.startTime; })
        .observe({ type: 'largest-contentful-paint', buffered: true });
    } catch {}
    const marks = ${JSON.stringify(marks)};
    const seen = () => {
      for (const [name, sel] of Object.entries(marks)) {
        if (w.__marks[name] === undefined && document.querySelector(sel)) w.__marks[name] = performance.now();
      }
      if (w.__rowSeen || !document.querySelector(${JSON.stringify(selector)})) return;
      w.__rowSeen = true;
      obs.disconnect();
      requestAnimationFrame(() => { w.__firstRowAt = performance.now(); });
    };
    const obs = new MutationObserver(seen);
    obs.observe(document, { childList: true, subtree: true });
  })();`;
}

async function measure(context: BrowserContext, url: string, selector: string, marks: Record<string, string> = {}, profile = false): Promise<Sample> {
  const page = await context.newPage();
  try {
    const cdp = await context.newCDPSession(page);
    if (profile) {
      await cdp.send('Profiler.enable');
      await cdp.send('Profiler.setSamplingInterval', { interval: 1000 });
      await cdp.send('Profiler.start');
    }
    await cdp.send('Network.enable');
    await cdp.send('Network.setCacheDisabled', { cacheDisabled: true });
    await cdp.send('Network.emulateNetworkConditions', phone.network);
    await cdp.send('Emulation.setCPUThrottlingRate', { rate: phone.cpuSlowdown });
    await page.addInitScript(probe(selector, marks));
    await page.goto(url, { waitUntil: 'commit', timeout: 120_000 });
    await page.waitForFunction(() => (window as unknown as { __firstRowAt?: number }).__firstRowAt !== undefined, null, { timeout: 120_000, polling: 50 });
    if (profile) printProfile((await cdp.send('Profiler.stop')).profile);
    // LCP settles a frame or two after the content it names.
    await page.waitForTimeout(300);
    const raw = await page.evaluate(() => {
      const w = window as unknown as { __firstRowAt: number; __lcp: number; __marks: Record<string, number> };
      const nav = performance.getEntriesByType('navigation')[0] as PerformanceNavigationTiming;
      const resources = (performance.getEntriesByType('resource') as PerformanceResourceTiming[]).map((r) => ({
        name: new URL(r.name).pathname,
        start: r.startTime,
        end: r.responseEnd,
        bytes: r.transferSize,
        script: r.initiatorType === 'script' || /\.js$/.test(new URL(r.name).pathname),
      }));
      return { firstRow: w.__firstRowAt, lcp: w.__lcp, marks: w.__marks, nav: { name: new URL(nav.name).pathname, start: 0, end: nav.responseEnd, bytes: nav.transferSize, script: false }, resources };
    });
    const before = [raw.nav, ...raw.resources].filter((r) => r.start < raw.firstRow);
    const scripts = before.filter((r) => r.script);
    return {
      firstRow: raw.firstRow,
      lcp: raw.lcp,
      marks: raw.marks,
      jsBeforeRow: scripts.reduce((n, r) => n + r.bytes, 0),
      jsFiles: scripts.length,
      allBeforeRow: before.reduce((n, r) => n + r.bytes, 0),
      requests: before.map(({ name, start, end, bytes }) => ({ name, start, end, bytes })),
    };
  } finally {
    await page.close();
  }
}

interface CpuProfile {
  nodes: { id: number; callFrame: { functionName: string; url: string; lineNumber: number }; children?: number[] }[];
  samples?: number[];
  timeDeltas?: number[];
}

/** Where the page's main thread spent its time until the first row: self time per script and per function. */
function printProfile(profile: CpuProfile): void {
  const byId = new Map(profile.nodes.map((n) => [n.id, n]));
  const self = new Map<number, number>();
  (profile.samples ?? []).forEach((id, i) => self.set(id, (self.get(id) ?? 0) + (profile.timeDeltas?.[i] ?? 0) / 1000));
  const byScript = new Map<string, number>();
  const byFunction = new Map<string, number>();
  for (const [id, ms] of self) {
    const frame = byId.get(id)!.callFrame;
    const script = frame.url ? new URL(frame.url).pathname.replace(/-[0-9a-f]{32}\.js$/, '.js') : `(${frame.functionName || 'native'})`;
    byScript.set(script, (byScript.get(script) ?? 0) + ms);
    const fn = `${frame.functionName || '(anonymous)'} ${script}:${frame.lineNumber}`;
    byFunction.set(fn, (byFunction.get(fn) ?? 0) + ms);
  }
  const top = (m: Map<string, number>, n: number) => [...m].sort((a, b) => b[1] - a[1]).slice(0, n);
  console.log('  CPU self time by script (ms):');
  for (const [k, v] of top(byScript, 12)) console.log(`    ${v.toFixed(0).padStart(6)}  ${k}`);
  console.log('  CPU self time by function (ms):');
  for (const [k, v] of top(byFunction, 15)) console.log(`    ${v.toFixed(0).padStart(6)}  ${k}`);
}

/** The bare app's server: its build through the same static handler as Isobar's, a JSON list compressed as Isobar's answers are. */
async function startBareServer(distDir: string): Promise<{ url: string; close: () => Promise<void> }> {
  const app = express();
  app.disable('x-powered-by');
  const rows = Array.from({ length: ROWS }, (_, i) => ({
    id: String(i + 1),
    title: `Row ${i + 1}: a name of a usual length`,
    detail: `REF-${String(100000 + i)} · a line of detail as long as a list usually shows`,
  }));
  app.get('/api/rows', compression({ threshold: 1024 }), (_req, res) => {
    res.set('Cache-Control', 'no-store').json({ items: rows });
  });
  serveWebApp(app, distDir);
  const server: Server = createServer(app);
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  return {
    url: `http://127.0.0.1:${(server.address() as AddressInfo).port}`,
    close: async () => {
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
    },
  };
}

/** Enough studies for a full first page of the worklist, beside the demo scenario's. */
async function seedStudies(ds: ReturnType<typeof createDataSource>): Promise<void> {
  await ds.query(
    `WITH p AS (
       INSERT INTO patient (mrn, family_name, given_name, birth_date, sex)
       SELECT 'FL-' || lpad(i::text, 4, '0'), (ARRAY['Ashby','Brandford','Calloway','Dunmore','Elmridge','Falkner'])[1 + i % 6],
              (ARRAY['Ada','Bram','Cora','Dmitri','Edda','Femi','Greta'])[1 + i % 7], date '1950-01-01' + i * 97, CASE WHEN i % 2 = 0 THEN 'female' ELSE 'male' END
       FROM generate_series(1, 40) i RETURNING id, mrn)
     INSERT INTO study (accession, patient_id, state, procedure_started_at, procedure_ended_at, indication, clinical_question, access_site, guide_french)
     SELECT 'FL-' || substr(p.mrn, 4), p.id, CASE WHEN substr(p.mrn, 4)::int % 3 = 0 THEN 'draft' ELSE 'awaiting-signature' END,
            now() - (substr(p.mrn, 4)::int * interval '3 hours') - interval '50 minutes', now() - (substr(p.mrn, 4)::int * interval '3 hours'),
            'Angina with no obstructive disease', 'angina-no-obstruction', 'right-radial', 6
     FROM p`,
  );
}

const kb = (bytes: number) => `${(bytes / 1024).toFixed(0)} KB`;
const sec = (ms: number) => `${(ms / 1000).toFixed(2)} s`;
const load = () => os.loadavg().map((l) => l.toFixed(2)).join(' / ');

async function main(): Promise<void> {
  console.log(`load average (1/5/15 min) at start: ${load()} on ${os.cpus().length} cores`);
  await prepareDatabase(process.env.MIGRATION_DATABASE_URL!, databaseUrl!);
  const ds = createDataSource(databaseUrl!, 4);
  await ds.initialize();
  const stack = await startStack(ds);
  const bare = await startBareServer(path.resolve(bareDist!));
  const browser = await launchBrowser();
  try {
    await seedDemo(ds, stack.idp.issuer);
    await seedStudies(ds);

    const bareContext = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const isobarContext = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const signInPage = await isobarContext.newPage();
    await signInInBrowser(signInPage, stack, 'ivarga');
    await signInPage.close();

    const sides = {
      bare: () => measure(bareContext, `${bare.url}/`, '[data-testid^="row-"]'),
      isobar: () => measure(isobarContext, `${stack.url}/`, '[data-testid^="study-row-"]', isobarMarks),
    };
    // One load each first, not counted: the servers' first answers are slower than any later one.
    await sides.bare();
    await sides.isobar();
    if (process.env.ISOBAR_BENCH_PROFILE) {
      console.log('CPU profile of one load, bare app:');
      await measure(bareContext, `${bare.url}/`, '[data-testid^="row-"]', {}, true);
      console.log('CPU profile of one load, Isobar:');
      await measure(isobarContext, `${stack.url}/`, '[data-testid^="study-row-"]', isobarMarks, true);
    }
    const samples: Record<keyof typeof sides, Sample[]> = { bare: [], isobar: [] };
    for (let i = 0; i < RUNS; i++) {
      for (const side of ['bare', 'isobar'] as const) {
        const s = await sides[side]();
        samples[side].push(s);
        console.log(`  run ${i + 1} ${side.padEnd(6)} rows ${sec(s.firstRow)}  LCP ${sec(s.lcp)}  JS ${kb(s.jsBeforeRow)} in ${s.jsFiles} file(s)  load ${os.loadavg()[0].toFixed(2)}`);
      }
    }

    const summary = (xs: Sample[]) => ({
      firstRow: median(xs.map((s) => s.firstRow)),
      lcp: median(xs.map((s) => s.lcp)),
      js: median(xs.map((s) => s.jsBeforeRow)),
      jsFiles: median(xs.map((s) => s.jsFiles)),
      all: median(xs.map((s) => s.allBeforeRow)),
      requests: median(xs.map((s) => s.requests.length)),
    });
    const b = summary(samples.bare);
    const s = summary(samples.isobar);
    console.log(`\nPhone profile: CPU ${phone.cpuSlowdown}× slower, ${phone.network.downloadThroughput * 8e-6} Mbit/s down, ${phone.network.latency} ms latency, cache off, ${viewports.phone.width}×${viewports.phone.height}; median of ${RUNS}`);
    const rows: [string, string, string][] = [
      ['first row on screen', sec(b.firstRow), sec(s.firstRow)],
      ['largest contentful paint', sec(b.lcp), sec(s.lcp)],
      ['JS before the first row (wire)', kb(b.js), kb(s.js)],
      ['JS files before the first row', String(b.jsFiles), String(s.jsFiles)],
      ['all bytes before the first row', kb(b.all), kb(s.all)],
      ['requests before the first row', String(b.requests), String(s.requests)],
    ];
    console.log(`${'measure'.padEnd(32)}${'bare app'.padStart(12)}${'Isobar'.padStart(12)}`);
    for (const [name, x, y] of rows) console.log(`${name.padEnd(32)}${x.padStart(12)}${y.padStart(12)}`);

    const medianRun = samples.isobar.find((x) => x.firstRow === s.firstRow) ?? samples.isobar[0];
    for (const name of Object.keys(isobarMarks)) {
      const at = samples.isobar.map((x) => x.marks[name]).filter((t): t is number => t !== undefined);
      console.log(`Isobar: ${name.padEnd(24)} ${at.length ? sec(median(at)) : 'never'} (median of ${at.length})`);
    }
    console.log(`\nIsobar, the median run: requests before the first row at ${Math.round(medianRun.firstRow)} ms (start → end, ms from navigation start)`);
    for (const r of medianRun.requests) console.log(`  ${String(Math.round(r.start)).padStart(6)} → ${String(Math.round(r.end)).padStart(6)}  ${kb(r.bytes).padStart(7)}  ${r.name}`);

    const rowsRatio = s.firstRow / b.firstRow;
    const jsRatio = s.js / b.js;
    const rowsOk = rowsRatio <= TARGET_ROWS_RATIO;
    const jsOk = jsRatio <= TARGET_JS_RATIO;
    console.log(`\nrows:        Isobar / bare = ${rowsRatio.toFixed(2)} (target ≤ ${TARGET_ROWS_RATIO}) ${rowsOk ? 'ok' : 'MISSED'}`);
    console.log(`JS on wire:  Isobar / bare = ${jsRatio.toFixed(2)} (target ≤ ${TARGET_JS_RATIO}) ${jsOk ? 'ok' : 'MISSED'}`);
    console.log(`load average (1/5/15 min) at the end: ${load()}`);
    if (!rowsOk || !jsOk) process.exitCode = 1;
  } finally {
    await browser.close();
    await bare.close();
    await stack.close();
    await ds.destroy();
  }
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
