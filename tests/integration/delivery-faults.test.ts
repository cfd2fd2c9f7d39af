import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import type { DiagnosticReport } from 'fhir/r4';
import { IDENTIFIER_SYSTEMS } from '../../fhir/codes';
import { EhrClient } from '../../server/ehr/ehr-client';
import { deliveryJobKey } from '../../server/ehr/enqueue-delivery';
import { createDeliveryTasks } from '../../server/ehr/tasks';
import { EHR_WRITE_SCOPES, startFakeEhr, type FakeEhr } from '../../server/fakes/ehr';
import { startFakeIdp, type FakeIdp } from '../../server/fakes/identity-provider';
import { createLogger } from '../../server/log';
import { startWorker } from '../../server/jobs/worker';
import { openTestDatabase, testConfig } from '../support/app';
import { cloneSignedStudy, createPhysician, signCompleteStudy, type Physician, type SignedStudy } from '../support/signing';
import { startWorkerProcess, type WorkerProcess } from '../support/worker-process';

// Faults around the EHR delivery: the real job queue, the server's delivery task, and the local EHR
// stand-in on loopback. One report is signed through the signing code; the many the tests need are
// copies of it for other invented patients, each stored with its delivery queued in one transaction as
// signing does (rendering 50 PDFs would take most of a minute). Every wait is a bounded loop.
// Everything here is invented: patients, people, accession numbers.

let db: DataSource;
let idp: FakeIdp;
let ehr: FakeEhr;
let ehrPort: number;
let physician: Physician;
/** A report signed through the signing code, the model for the others. */
let template: SignedStudy;
const signMany = async (n: number) => {
  const signed: SignedStudy[] = [];
  for (let i = 0; i < n; i++) signed.push(await cloneSignedStudy(db, template));
  return signed;
};
const secret = 'test-ehr-client-secret';
const processes: WorkerProcess[] = [];
const DAY = 24 * 3_600_000;

async function freePort(): Promise<number> {
  const { createServer } = await import('node:net');
  return new Promise((resolve) => {
    const s = createServer().listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
  });
}

/** Polls until `check` holds, at most `timeoutMs`; fails with `what` otherwise. */
async function until(what: string, check: () => boolean | Promise<boolean>, timeoutMs = 20_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`timed out after ${timeoutMs} ms waiting for: ${what}`);
}

const startEhr = async () => {
  ehr = await startFakeEhr({ port: ehrPort, issuer: idp.issuer });
};

/** The environment a worker process reads its settings from, as the server does. */
const workerEnv = () => ({
  EHR_FHIR_URL: `http://127.0.0.1:${ehrPort}/fhir`,
  OIDC_ISSUER: idp.issuer,
  EHR_CLIENT_ID: 'isobar-ehr',
  EHR_CLIENT_SECRET: secret,
  EHR_TIMEOUT_SECONDS: '20',
});
const spawnWorker = async (env: Record<string, string> = {}) => {
  const w = await startWorkerProcess({ ...workerEnv(), ...env });
  processes.push(w);
  return w;
};

const ids = (signed: SignedStudy[]) => signed.map((s) => s.reportVersionId);
const deliveries = async (signed: SignedStudy[]) =>
  (await db.query(`SELECT report_version_id, status, attempts, ehr_report_id FROM report_delivery WHERE report_version_id = ANY($1::uuid[])`, [ids(signed)])) as {
    report_version_id: string;
    status: string;
    attempts: number;
    ehr_report_id: string | null;
  }[];
const allDelivered = async (signed: SignedStudy[]) => (await deliveries(signed)).filter((d) => d.status === 'delivered').length === signed.length;

const bundleIdOf = (s: SignedStudy) => `${IDENTIFIER_SYSTEMS.bundle}|${s.studyId}/v1`;
const receivedFor = (s: SignedStudy) => ehr.received.filter((r) => r.identifier === bundleIdOf(s)).map((r) => r.outcome);
const reportsFor = (s: SignedStudy) =>
  (ehr.resources('DiagnosticReport') as DiagnosticReport[]).filter((r) => r.identifier?.some((i) => i.system === IDENTIFIER_SYSTEMS.report && i.value === s.studyId));

beforeAll(async () => {
  db = await openTestDatabase();
  physician = await createPhysician(db);
  template = await signCompleteStudy(db, physician);
  ehrPort = await freePort();
  idp = await startFakeIdp({
    port: 0,
    clientId: 'isobar',
    clientSecret: 'x',
    appUrl: 'http://127.0.0.1:1',
    serviceClients: [{ clientId: 'isobar-ehr', clientSecret: secret, audience: `http://127.0.0.1:${ehrPort}/fhir`, scope: EHR_WRITE_SCOPES.join(' ') }],
  });
  await startEhr();
});
beforeEach(() => ehr.setFault('none'));
afterAll(async () => {
  for (const p of processes) await p.kill('SIGKILL');
  await ehr?.close();
  await idp?.close();
  await db?.destroy();
});

describe('the EHR down while reports are signed', () => {
  it('50 reports signed while nothing listens at the EHR address; once it is back, each is received exactly once', async () => {
    const config = testConfig();
    const client = new EhrClient({ fhirBaseUrl: `http://127.0.0.1:${ehrPort}/fhir`, issuer: idp.issuer, clientId: 'isobar-ehr', clientSecret: secret, scope: EHR_WRITE_SCOPES.join(' '), timeoutMs: 5000 });
    const tasks = createDeliveryTasks({ send: (b) => client.sendTransaction(b), limitMs: DAY, leaseMs: 60_000, identifierSystems: config.ehr.identifierSystems });
    const worker = await startWorker(tasks, { databaseUrl: config.databaseUrl, logger: createLogger('silent'), concurrency: 4, pollInterval: 100 });
    try {
      await ehr.close();
      const signed = await signMany(50);

      // Every delivery has been tried and failed (connection refused), and waits for its retry.
      await until('a failed first try of all 50', async () => (await deliveries(signed)).every((d) => d.attempts >= 1 && d.status === 'failed-retrying'));

      await startEhr();
      // Rather than wait out the queue's backoff (e^attempts seconds), the waiting retries are made due now.
      await db.query(`UPDATE graphile_worker._private_jobs SET run_at = now() WHERE key = ANY($1::text[])`, [ids(signed).map(deliveryJobKey)]);
      await until('all 50 delivered', () => allDelivered(signed), 40_000);

      for (const s of signed) {
        expect(receivedFor(s), s.accession).toEqual(['accepted']);
        expect(reportsFor(s), s.accession).toHaveLength(1);
      }
      const reports = new Set((await deliveries(signed)).map((d) => d.ehr_report_id));
      expect(reports.size).toBe(50);
      expect(ehr.received.filter((r) => signed.some((s) => r.identifier === bundleIdOf(s))).length).toBe(50);
    } finally {
      await worker.stop();
    }
  }, 60_000);
});

describe('worker processes', () => {
  it('a worker killed (SIGKILL) mid-delivery: after a restart each report is delivered once and the EHR keeps one report', async () => {
    const first = await spawnWorker({ WORKER_CONCURRENCY: '4' });

    // X: the EHR holds the request open without processing it.
    ehr.setFault('hang');
    const [x] = await signMany(1);
    await first.waitFor((e) => e.event === 'started' && e.id === x.reportVersionId);
    await until('the EHR holding the request for X', () => ehr.heldRequests().includes(bundleIdOf(x)));

    // Y: the EHR stores the transaction but its answer never leaves (the EHR committed, the sender never hears).
    ehr.setFault('hold-response');
    const [y] = await signMany(1);
    await until('the EHR storing Y without answering', () => ehr.heldRequests().includes(bundleIdOf(y)));
    expect(receivedFor(x)).toEqual([]);
    expect(receivedFor(y)).toEqual(['accepted']);
    expect(reportsFor(y)).toHaveLength(1);
    expect((await deliveries([x, y])).map((d) => d.status)).toEqual(['sending', 'sending']);

    await first.kill('SIGKILL');
    ehr.setFault('none');
    // The dead worker's jobs stay locked; graphile-worker frees a lock once it is four hours old, and the
    // delivery's own lease (minutes) has run out by then. Four hours pass: both moved back in time.
    const keys = [x, y].map((s) => deliveryJobKey(s.reportVersionId));
    const locked = await db.query(`SELECT locked_at FROM graphile_worker._private_jobs WHERE key = ANY($1::text[])`, [keys]);
    expect(locked.map((j: { locked_at: Date | null }) => j.locked_at !== null)).toEqual([true, true]);
    await db.query(`UPDATE graphile_worker._private_jobs SET locked_at = locked_at - interval '4 hours 1 minute' WHERE key = ANY($1::text[])`, [keys]);
    await db.query(
      `UPDATE report_delivery SET lease_until = lease_until - interval '4 hours 1 minute', first_attempt_at = first_attempt_at - interval '4 hours 1 minute'
        WHERE report_version_id = ANY($1::uuid[])`,
      [ids([x, y])],
    );

    const second = await spawnWorker();
    await until('X and Y delivered after the restart', () => allDelivered([x, y]));
    // X reaches the EHR for the first time; Y is sent again and recognised by its Bundle.identifier
    // (and would be a conditional update by identifier anyway): one DiagnosticReport each.
    expect(receivedFor(x)).toEqual(['accepted']);
    expect(receivedFor(y)).toEqual(['accepted', 'resend']);
    expect(reportsFor(x)).toHaveLength(1);
    expect(reportsFor(y)).toHaveLength(1);
    const [dx, dy] = await Promise.all([deliveries([x]), deliveries([y])]);
    expect(dx[0]).toMatchObject({ status: 'delivered', attempts: 2, ehr_report_id: `DiagnosticReport/${reportsFor(x)[0].id}` });
    expect(dy[0]).toMatchObject({ status: 'delivered', attempts: 2, ehr_report_id: `DiagnosticReport/${reportsFor(y)[0].id}` });
    expect(second.events.some((e) => e.event === 'finished' && e.id === y.reportVersionId)).toBe(true);
    await second.kill('SIGTERM');
  }, 60_000);

  it('two worker processes on one queue: a backlog of 20 signed reports, each sent once', async () => {
    const signed = await signMany(20);
    const [a, b] = await Promise.all([spawnWorker(), spawnWorker()]);
    await until('all 20 delivered', () => allDelivered(signed), 30_000);

    for (const s of signed) {
      expect(receivedFor(s), s.accession).toEqual(['accepted']);
      expect(reportsFor(s), s.accession).toHaveLength(1);
    }
    expect((await deliveries(signed)).every((d) => d.attempts === 1)).toBe(true);
    // Each job ran in exactly one of the two processes (the queue's row locking), and both took part.
    const startedBy = (w: WorkerProcess) => new Set(w.events.filter((e) => e.event === 'started' && ids(signed).includes(e.id!)).map((e) => e.id));
    const [byA, byB] = [startedBy(a), startedBy(b)];
    expect([...byA].filter((id) => byB.has(id))).toEqual([]);
    expect(byA.size + byB.size).toBe(20);
    expect(byA.size).toBeGreaterThan(0);
    expect(byB.size).toBeGreaterThan(0);
    await Promise.all([a.kill('SIGTERM'), b.kill('SIGTERM')]);
  }, 60_000);
});
