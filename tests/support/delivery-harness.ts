import { createServer } from 'node:net';
import type { DataSource } from 'typeorm';
import type { DiagnosticReport } from 'fhir/r4';
import { IDENTIFIER_SYSTEMS } from '../../fhir/codes';
import { EHR_WRITE_SCOPES, startFakeEhr, type FakeEhr } from '../../server/fakes/ehr';
import { startFakeIdp, type FakeIdp } from '../../server/fakes/identity-provider';
import { openTestDatabase } from './app';
import { cloneSignedStudy, createPhysician, signCompleteStudy, type SignedStudy } from './signing';
import { startWorkerProcess, type WorkerProcess } from './worker-process';

/**
 * What the delivery fault tests share: the test database, the local identity provider with Isobar's
 * EHR client, the EHR stand-in on a loopback port that stays the same when it is stopped and started,
 * one report signed through the signing code and cheap copies of it (`signMany`), worker processes,
 * and bounded waits. Everything is invented: patients, people, accession numbers.
 */

export interface DeliveryRow {
  report_version_id: string;
  status: string;
  attempts: number;
  ehr_report_id: string | null;
}

async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = createServer().listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
  });
}

/** Polls until `check` holds, at most `timeoutMs`; fails naming `what` otherwise. */
export async function until(what: string, check: () => boolean | Promise<boolean>, timeoutMs = 20_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`timed out after ${timeoutMs} ms waiting for: ${what}`);
}

export const reportVersionIds = (signed: SignedStudy[]) => signed.map((s) => s.reportVersionId);
export const bundleIdOf = (s: SignedStudy) => `${IDENTIFIER_SYSTEMS.bundle}|${s.studyId}/v1`;

export class DeliveryHarness {
  db!: DataSource;
  idp!: FakeIdp;
  ehr!: FakeEhr;
  ehrPort!: number;
  readonly secret = 'test-ehr-client-secret';
  /** A report signed through the signing code (which queues its delivery), the model for `signMany`. */
  template!: SignedStudy;
  private processes: WorkerProcess[] = [];

  async start(): Promise<void> {
    this.db = await openTestDatabase();
    this.template = await signCompleteStudy(this.db, await createPhysician(this.db));
    this.ehrPort = await freePort();
    this.idp = await startFakeIdp({
      port: 0,
      clientId: 'isobar',
      clientSecret: 'x',
      appUrl: 'http://127.0.0.1:1',
      serviceClients: [{ clientId: 'isobar-ehr', clientSecret: this.secret, audience: this.fhirBaseUrl, scope: EHR_WRITE_SCOPES.join(' ') }],
    });
    await this.startEhr();
  }

  get fhirBaseUrl(): string {
    return `http://127.0.0.1:${this.ehrPort}/fhir`;
  }

  /** Starts the EHR stand-in (again) on its port: a restarted EHR remembers nothing it received before. */
  async startEhr(): Promise<void> {
    this.ehr = await startFakeEhr({ port: this.ehrPort, issuer: this.idp.issuer });
  }

  /**
   * `n` more signed reports like the template, each stored with its delivery queued in one
   * transaction as signing does (rendering a PDF per report would take most of a minute for 50).
   */
  async signMany(n: number): Promise<SignedStudy[]> {
    const signed: SignedStudy[] = [];
    for (let i = 0; i < n; i++) signed.push(await cloneSignedStudy(this.db, this.template));
    return signed;
  }

  /** A worker process configured from the environment as the server is, pointing at this EHR. */
  async spawnWorker(env: Record<string, string> = {}): Promise<WorkerProcess> {
    const w = await startWorkerProcess({
      EHR_FHIR_URL: this.fhirBaseUrl,
      OIDC_ISSUER: this.idp.issuer,
      EHR_CLIENT_ID: 'isobar-ehr',
      EHR_CLIENT_SECRET: this.secret,
      EHR_TIMEOUT_SECONDS: '20',
      ...env,
    });
    this.processes.push(w);
    return w;
  }

  async deliveries(signed: SignedStudy[]): Promise<DeliveryRow[]> {
    return (await this.db.query(
      `SELECT report_version_id, status, attempts, ehr_report_id FROM report_delivery
        WHERE report_version_id = ANY($1::uuid[]) ORDER BY array_position($1::uuid[], report_version_id)`,
      [reportVersionIds(signed)],
    )) as DeliveryRow[];
  }

  async allDelivered(signed: SignedStudy[]): Promise<boolean> {
    return (await this.deliveries(signed)).filter((d) => d.status === 'delivered').length === signed.length;
  }

  /** What the EHR made of each request carrying this report's bundle: accepted, resend, rejected. */
  receivedFor(s: SignedStudy): string[] {
    return this.ehr.received.filter((r) => r.identifier === bundleIdOf(s)).map((r) => r.outcome);
  }

  /** The DiagnosticReports the EHR keeps for this study (matched by the report identifier). */
  reportsFor(s: SignedStudy): DiagnosticReport[] {
    return (this.ehr.resources('DiagnosticReport') as DiagnosticReport[]).filter((r) => r.identifier?.some((i) => i.system === IDENTIFIER_SYSTEMS.report && i.value === s.studyId));
  }

  /** Ends every worker process this harness started, so none of them takes the next test's jobs. */
  async killWorkers(): Promise<void> {
    for (const p of this.processes.splice(0)) await p.kill('SIGKILL');
  }

  async stop(): Promise<void> {
    await this.killWorkers();
    await this.ehr?.close();
    await this.idp?.close();
    await this.db?.destroy();
  }
}
