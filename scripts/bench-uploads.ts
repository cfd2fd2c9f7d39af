/**
 * Memory under concurrent uploads. The app runs in this process; the files are sent from a child
 * process (streamed from disk), so the resident memory measured is the server's alone. Each round
 * sends BENCH_UPLOADS uploads of BENCH_UPLOAD_MB at once to a draft study's attachment route, first a
 * PDF printout, then a CSV export (the CSV is judged from its text, the PDF by its signature).
 * Resident memory is sampled every 20 ms and read from the kernel's high-water mark (VmHWM, reset
 * before the uploads where the kernel allows it). Not a test: it prints numbers.
 */
import fs from 'node:fs';
import http from 'node:http';
import os from 'node:os';
import path from 'node:path';
import { spawn } from 'node:child_process';
import { fileURLToPath } from 'node:url';

const UPLOADS = Number(process.env.BENCH_UPLOADS ?? 8);
const MB = Number(process.env.BENCH_UPLOAD_MB ?? 19);
const ROUNDS = Number(process.env.BENCH_UPLOAD_ROUNDS ?? 3);

interface Job {
  url: string;
  cookie: string;
  origin: string;
  file: string;
  fileName: string;
  mediaType: string;
  count: number;
}

/** Child process: sends `count` uploads of one file at once, multipart/form-data streamed from disk. */
async function client(job: Job): Promise<void> {
  const size = fs.statSync(job.file).size;
  const boundary = `----isobar-bench-${process.pid}`;
  const head = Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="${job.fileName}"\r\nContent-Type: ${job.mediaType}\r\n\r\n`);
  const tail = Buffer.from(`\r\n--${boundary}--\r\n`);
  const one = () =>
    new Promise<number>((resolve, reject) => {
      const req = http.request(job.url, {
        method: 'POST',
        agent: false,
        headers: { cookie: job.cookie, origin: job.origin, 'content-type': `multipart/form-data; boundary=${boundary}`, 'content-length': head.length + size + tail.length },
      });
      req.on('response', (res) => {
        res.resume();
        res.on('end', () => resolve(res.statusCode ?? 0));
      });
      req.on('error', reject);
      req.write(head);
      const body = fs.createReadStream(job.file);
      body.pipe(req, { end: false });
      body.on('end', () => req.end(tail));
    });
  const statuses = await Promise.all(Array.from({ length: job.count }, one));
  process.stdout.write(JSON.stringify(statuses));
}

function sendFromChild(job: Job): Promise<number[]> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [...process.execArgv, fileURLToPath(import.meta.url), '--client'], { stdio: ['pipe', 'pipe', 'inherit'] });
    let out = '';
    child.stdout.on('data', (d) => (out += d));
    child.on('exit', (code) => (code === 0 ? resolve(JSON.parse(out)) : reject(new Error(`upload client exited ${code}`))));
    child.stdin.end(JSON.stringify(job));
  });
}

const mb = (bytes: number) => Math.round(bytes / 1048576);

/** The kernel's record of this process's peak resident memory (bytes), and a way to restart it. */
const highWater = () => Number(/VmHWM:\s+(\d+) kB/.exec(fs.readFileSync('/proc/self/status', 'utf8'))?.[1] ?? 0) * 1024;
const resetHighWater = () => {
  try {
    fs.writeFileSync('/proc/self/clear_refs', '5');
    return true;
  } catch {
    return false;
  }
};

async function main(): Promise<void> {
  const { prepareDatabase } = await import('../server/cli/prepare-database');
  const { createDataSource } = await import('../server/db/data-source');
  const { signIn, startStack } = await import('../tests/support/stack');
  const { createStudy } = await import('../tests/support/factories');
  const databaseUrl = process.env.DATABASE_URL!;
  await prepareDatabase(process.env.MIGRATION_DATABASE_URL!, databaseUrl);
  const ds = createDataSource(databaseUrl, 10);
  await ds.initialize();
  // Every upload of a round is let in (the app's default lets 4 in at once and answers more with 503).
  const stack = await startStack(ds, { attachments: { dir: process.env.ATTACHMENT_DIR!, maxBytes: 20 * 1024 * 1024, maxConcurrentUploads: UPLOADS } });
  const { cookie } = await signIn(stack, 'ivarga');

  const dir = fs.mkdtempSync(path.join(os.tmpdir(), 'isobar-uploads-'));
  const bytes = MB * 1024 * 1024;
  const pdf = path.join(dir, 'printout.pdf');
  const pdfHead = '%PDF-1.7\n%\xE2\xE3\xCF\xD3\n';
  fs.writeFileSync(pdf, Buffer.concat([Buffer.from(pdfHead, 'latin1'), Buffer.alloc(bytes - pdfHead.length - 6, 0x20), Buffer.from('%%EOF\n')]));
  const csv = path.join(dir, 'trace.csv');
  const line = 'time_s,pa_mmHg,pd_mmHg,ecg_mV\n';
  const row = '12.345,93.21,80.14,0.512\n';
  fs.writeFileSync(csv, line + row.repeat(Math.floor((bytes - line.length) / row.length)));

  const kinds = [
    { fileName: 'printout.pdf', mediaType: 'application/pdf', file: pdf },
    { fileName: 'trace.csv', mediaType: 'text/csv', file: csv },
  ];
  const results: Record<string, unknown>[] = [];
  for (const kind of kinds) {
    const study = await createStudy(ds);
    const url = `${stack.url}/api/studies/${study.id}/attachments`;
    // One upload first, so what every request needs once (modules, pools) is loaded before measuring.
    await sendFromChild({ url, cookie, origin: stack.url, ...kind, count: 1 });
    for (let round = 1; round <= ROUNDS; round++) {
      global.gc?.();
      const before = process.memoryUsage().rss;
      const kernelPeak = resetHighWater();
      let sampledPeak = before;
      const sampler = setInterval(() => (sampledPeak = Math.max(sampledPeak, process.memoryUsage().rss)), 20);
      const started = Date.now();
      const statuses = await sendFromChild({ url, cookie, origin: stack.url, ...kind, count: UPLOADS });
      const seconds = (Date.now() - started) / 1000;
      clearInterval(sampler);
      const peak = Math.max(sampledPeak, process.memoryUsage().rss, kernelPeak ? highWater() : 0);
      const after = process.memoryUsage().rss;
      results.push({
        file: kind.fileName,
        round,
        statuses: [...new Set(statuses)].map((s) => `${s}×${statuses.filter((x) => x === s).length}`).join(' '),
        seconds: +seconds.toFixed(1),
        rssBeforeMB: mb(before),
        rssPeakMB: mb(peak),
        rssAfterMB: mb(after),
        peakGrowthMB: mb(peak - before),
      });
    }
  }
  const sum = mb(UPLOADS * bytes);
  console.log(`${UPLOADS} uploads of ${MB} MB at once (${sum} MB in flight per round), ${ROUNDS} rounds per file, load average ${os.loadavg()[0].toFixed(1)}`);
  console.table(results);
  const worst = Math.max(...results.map((r) => r.peakGrowthMB as number));
  console.log(`largest peak growth: ${worst} MB (target < 100 MB, well under the ${sum} MB in flight)${resetHighWater() ? '' : ' — the kernel high-water mark could not be reset: sampled peaks only'}`);

  await stack.close();
  await ds.destroy();
  fs.rmSync(dir, { recursive: true, force: true });
}

if (process.argv.includes('--client')) {
  let input = '';
  process.stdin.on('data', (d) => (input += d));
  process.stdin.on('end', () =>
    client(JSON.parse(input)).catch((error) => {
      console.error(error);
      process.exit(1);
    }),
  );
} else {
  main().catch((error) => {
    console.error(error);
    process.exit(1);
  });
}
