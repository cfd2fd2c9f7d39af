import { createHash, randomUUID } from 'node:crypto';
import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import type { DiagnosticReport, Observation, Patient } from 'fhir/r4';
import { Logger, runOnce, type TaskList } from 'graphile-worker';
import { IDENTIFIER_SYSTEMS } from '../../fhir/codes';
import { toReportBundle } from '../../fhir/report-bundle';
import { analyzeStudy } from '../../shared/physiology';
import { defaultThresholds } from '../../shared/physiology/thresholds';
import { reportBundleInputOf } from '../../server/ehr/build-report-bundle';
import { deliverReport, TransientDeliveryError } from '../../server/ehr/deliver-report';
import { EhrClient } from '../../server/ehr/ehr-client';
import { deliveryJobKey, enqueueDelivery } from '../../server/ehr/enqueue-delivery';
import { listDeliveriesNeedingAttention, listStudyDeliveries } from '../../server/ehr/queries/deliveries';
import { requeueDelivery } from '../../server/ehr/queries/delivery-resend';
import { createDeliveryTasks } from '../../server/ehr/tasks';
import { EHR_WRITE_SCOPES, startFakeEhr, type FakeEhr } from '../../server/fakes/ehr';
import { startFakeIdp, type FakeIdp } from '../../server/fakes/identity-provider';
import { startFakeSmtp } from '../../server/fakes/smtp';
import { sendDeliveryFailureNoticeTask } from '../../server/mail/send-delivery-failure-notice';
import { openTestDatabase } from '../support/app';
import { createStudy } from '../support/factories';
import type { ReportVersionStatus } from '../../shared/report/version-status';

// Everything here is invented: patients, people, accession numbers and the "PDF" (any bytes with their SHA-256).

let db: DataSource;
let idp: FakeIdp;
let ehr: FakeEhr;
let client: EhrClient;
let operatorId: string;
const secret = 'test-ehr-client-secret';
const identifierSystems = { patient: 'urn:oid:2.16.840.1.113883.19.5.1', encounter: 'urn:oid:2.16.840.1.113883.19.5.2', accession: 'urn:oid:2.16.840.1.113883.19.5.3' };
const quiet = new Logger(() => () => undefined);
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

const tasksWith = (limitMs = DAY): TaskList => createDeliveryTasks(db, { send: (b) => client.sendTransaction(b), limitMs, leaseMs: 60_000, identifierSystems, settingsDefaults: { ehrBaseUrl: ehr.fhirBaseUrl } });

/** One pass of the job queue over every job that is due (graphile-worker's runOnce). */
const work = (tasks: TaskList = tasksWith()) => runOnce({ connectionString: process.env.DATABASE_URL!, taskList: tasks, logger: quiet });

/** Makes a waiting retry due now, instead of waiting out the queue's backoff. */
const dueNow = (reportVersionId: string) => db.query(`UPDATE graphile_worker._private_jobs SET run_at = now() WHERE key = $1`, [deliveryJobKey(reportVersionId)]);
const jobOf = async (reportVersionId: string) =>
  ((await db.query(`SELECT attempts, run_at, last_error FROM graphile_worker._private_jobs WHERE key = $1`, [deliveryJobKey(reportVersionId)])) as { attempts: number; run_at: Date; last_error: string | null }[])[0];
const deliveryOf = async (reportVersionId: string) => ((await db.query(`SELECT * FROM report_delivery WHERE report_version_id = $1`, [reportVersionId])) as Record<string, any>[])[0];

const enqueue = (reportVersionId: string) => db.transaction((m) => enqueueDelivery(m, reportVersionId));

interface Signed {
  id: string;
  studyId: string;
  accession: string;
  mrn: string;
  pdf: Buffer;
}

/** A signed study with report version 1, inserted as the signing step stores it. */
async function signedStudy(snapshotChanges: (s: Record<string, any>) => void = () => undefined): Promise<Signed> {
  const study = await createStudy(db, { state: 'signed' });
  const vesselId = randomUUID();
  const snapshot: Record<string, any> = {
    id: study.id,
    accession: study.accession,
    patient: { mrn: study.patient.mrn, familyName: 'Testperson', givenName: 'Ada', birthDate: '1962-04-17', sex: 'female' },
    details: {
      encounter: `ENC-${study.accession}`,
      patientClass: 'outpatient',
      procedureStartedAt: '2026-03-02T08:10:00+01:00',
      procedureEndedAt: '2026-03-02T09:05:00+01:00',
      operatorId,
    },
    vessels: [{ id: vesselId, vessel: 'LAD', segment: '6' }],
    vasoreactivity: { doses: [] },
    findings: { impression: 'Invented impression: haemodynamically significant proximal LAD stenosis.' },
  };
  snapshotChanges(snapshot);
  const id = await insertVersion(study.id, 1, 'final', null, snapshot, vesselId);
  return { id, studyId: study.id, accession: study.accession, mrn: study.patient.mrn, pdf: pdfOf(study.id, 1) };
}

const pdfOf = (studyId: string, version: number) => Buffer.from(`%PDF-1.7\n% invented report ${studyId} v${version}\n%%EOF\n`);

async function insertVersion(studyId: string, versionNo: number, status: ReportVersionStatus, supersedesId: string | null, snapshot: unknown, vesselId: string): Promise<string> {
  // Hand-computed case (FFR formula): hyperaemic Pd/Pa 72/90 = 0.80; resting Pd/Pa 95/100 = 0.95; CFR 0.90/0.30 = 3.0.
  const analysis = analyzeStudy({
    vessels: [{ id: vesselId, vessel: 'LAD', rest: { pa: 100, pd: 95, tmn: [0.9, 0.9, 0.9] }, hyperemia: { pa: 90, pd: 72, tmn: [0.3, 0.3, 0.3] } }],
  });
  const pdf = pdfOf(studyId, versionNo);
  const [row] = await db.query(
    `WITH v AS (
       INSERT INTO report_version (study_id, version_no, study_version, status, supersedes_id, reason, narrative_html, narrative_text, snapshot, analysis,
                                   thresholds, template_version, content_sha256, signed_by, signer_name, signed_at, attestation)
       VALUES ($1, $2, 1, $3, $4, $5, '<p>Invented</p>', 'Invented', $6::jsonb, $7::jsonb, $8::jsonb, 'v1', $11, $12, 'Dr Invented Operator', $13, 'Invented attestation')
       RETURNING id)
     INSERT INTO report_pdf (report_version_id, pdf, pdf_sha256) SELECT id, $9, $10 FROM v RETURNING report_version_id AS id`,
    [
      studyId,
      versionNo,
      status,
      supersedesId,
      status === 'amended' ? 'Invented addendum reason' : null,
      JSON.stringify(snapshot),
      JSON.stringify(analysis),
      JSON.stringify(defaultThresholds),
      pdf,
      createHash('sha256').update(pdf).digest('hex'),
      createHash('sha256').update(`content ${studyId} ${versionNo}`).digest('hex'),
      operatorId,
      versionNo === 1 ? '2026-03-02T10:00:00+01:00' : '2026-03-03T11:30:00+01:00',
    ],
  );
  return row.id as string;
}

const bundleIdOf = (s: { studyId: string }, version = 1) => `${IDENTIFIER_SYSTEMS.bundle}|${s.studyId}/v${version}`;
const receivedFor = (s: { studyId: string }, version = 1) => ehr.received.filter((r) => r.identifier === bundleIdOf(s, version));
const reportsFor = (s: { studyId: string }) =>
  (ehr.resources('DiagnosticReport') as DiagnosticReport[]).filter((r) => r.identifier?.some((i) => i.system === IDENTIFIER_SYSTEMS.report && i.value === s.studyId));

beforeAll(async () => {
  db = await openTestDatabase();
  const [user] = await db.query(
    `INSERT INTO app_user (issuer, subject, email, display_name, role) VALUES ('test', $1, 'operator@example.test', 'Dr Invented Operator', 'physician') RETURNING id`,
    [`operator-${randomUUID()}`],
  );
  operatorId = user.id;
  const port = await freePort();
  const audience = `http://127.0.0.1:${port}/fhir`;
  idp = await startFakeIdp({
    port: 0,
    clientId: 'isobar',
    clientSecret: 'x',
    appUrl: 'http://127.0.0.1:1',
    serviceClients: [{ clientId: 'isobar-ehr', clientSecret: secret, audience, scope: EHR_WRITE_SCOPES.join(' ') }],
  });
  ehr = await startFakeEhr({ port, issuer: idp.issuer });
  client = new EhrClient({ fhirBaseUrl: ehr.fhirBaseUrl, issuer: idp.issuer, clientId: 'isobar-ehr', clientSecret: secret, scope: EHR_WRITE_SCOPES.join(' '), timeoutMs: 5000 });
});
afterAll(async () => {
  await ehr?.close();
  await idp?.close();
  await db?.destroy();
});
beforeEach(() => ehr.setFault('none'));

describe('a signed report version is delivered to the EHR by the job queue', () => {
  it('queues with the signature, then sends once: delivered, with the EHR ids of the report and its resources', async () => {
    const s = await signedStudy();
    await enqueue(s.id);
    expect(await deliveryOf(s.id)).toMatchObject({ status: 'queued', attempts: 0 });
    expect((await listStudyDeliveries(db, s.studyId))[0]).toMatchObject({ versionNo: 1, status: 'queued' });

    await work();

    const d = await deliveryOf(s.id);
    expect(d).toMatchObject({ status: 'delivered', attempts: 1, last_error: null, bundle_identifier: bundleIdOf(s) });
    expect(await jobOf(s.id)).toBeUndefined(); // a finished job leaves the queue
    expect(receivedFor(s).map((r) => r.outcome)).toEqual(['accepted']);

    const [report] = reportsFor(s);
    expect(reportsFor(s)).toHaveLength(1);
    expect(d.ehr_report_id).toBe(`DiagnosticReport/${report.id}`);
    // FHIR R4 Bundle.entry.response.location: one per entry of the transaction, in order (http.html#transaction-response).
    const types = (d.ehr_ids as { resourceType: string }[]).map((i) => i.resourceType);
    expect(types[0]).toBe('Patient');
    expect(types[1]).toBe('Encounter');
    expect(types.at(-1)).toBe('DiagnosticReport');
    expect(types.filter((t) => t === 'Observation').length).toBe(report.result!.length);

    // FHIR R4 DiagnosticReport.status: "final" for a first signature.
    expect(report.status).toBe('final');
    // FHIR R4 Attachment.hash: SHA-1 of the data, base64.
    expect(report.presentedForm![0].hash).toBe(createHash('sha1').update(s.pdf).digest('base64'));
    // The patient was matched by the MRN in the hospital's identifier system (FHIR R4 conditional create, http.html#ccreate).
    const patient = ehr.resources('Patient').find((p) => `Patient/${p.id}` === report.subject?.reference) as Patient;
    expect(patient.identifier).toContainEqual({ system: identifierSystems.patient, value: s.mrn });
    // The accession number names the order (v2-0203 ACSN, FHIR R4 Identifier.type).
    expect(report.basedOn?.[0].identifier?.value).toBe(s.accession);
    // The operator from the signed record is the performer; the signer interprets.
    expect(report.performer?.map((p) => p.display)).toContain('Dr Invented Operator');
    const ffr = (ehr.resources('Observation') as Observation[]).find((o) => report.result!.some((r) => r.reference === `Observation/${o.id}`) && o.identifier?.[0].value?.endsWith('/ffr'));
    // Hand-computed from the FFR formula: 72 / 90 = 0.80 (JSON drops the trailing zero).
    expect(ffr?.valueQuantity?.value).toBe(0.8);
    // The segment travels as text beside the artery's code.
    expect(ffr?.bodySite?.text).toContain('Proximal LAD');
  });

  it('adds nothing when the signing transaction rolls back', async () => {
    const s = await signedStudy();
    await expect(
      db.transaction(async (m) => {
        await enqueueDelivery(m, s.id);
        throw new Error('signature refused');
      }),
    ).rejects.toThrow('signature refused');
    expect(await deliveryOf(s.id)).toBeUndefined();
    expect(await jobOf(s.id)).toBeUndefined();
  });

  it('queues one job however often the same version is queued before it runs', async () => {
    const s = await signedStudy();
    await enqueue(s.id);
    await enqueue(s.id);
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM graphile_worker._private_jobs WHERE key = $1`, [deliveryJobKey(s.id)]);
    expect(n).toBe(1);
    await work();
    expect(receivedFor(s)).toHaveLength(1);
  });
});

describe('an EHR that is down', () => {
  it('503 twice: retried with the queue backoff, then delivered once when the EHR is back', async () => {
    const s = await signedStudy();
    await enqueue(s.id);
    ehr.setFault('unavailable');

    const before = Date.now();
    await work();
    let d = await deliveryOf(s.id);
    expect(d).toMatchObject({ status: 'failed-retrying', attempts: 1, http_status: 503, last_error: 'EHR answered 503' });
    // graphile-worker waits exp(min(attempts, 10)) seconds after a failed attempt: e¹ ≈ 2.7 s after the first.
    const job = await jobOf(s.id);
    expect(job.attempts).toBe(1);
    expect(job.run_at.getTime() - before).toBeGreaterThan(2000);
    expect(job.run_at.getTime() - Date.now()).toBeLessThan(3000);
    expect(d.next_attempt_at.getTime()).toBeGreaterThan(before + 2000);
    // The error is Isobar's text, never the patient's data.
    expect(d.last_error).not.toContain(s.mrn);
    expect(d.last_error).not.toContain('Testperson');

    await work(); // not due yet: nothing happens
    expect((await deliveryOf(s.id)).attempts).toBe(1);

    await dueNow(s.id);
    await work();
    expect(await deliveryOf(s.id)).toMatchObject({ status: 'failed-retrying', attempts: 2 });
    expect((await listDeliveriesNeedingAttention(db)).find((i) => i.reportVersionId === s.id)).toMatchObject({ accession: s.accession, status: 'failed-retrying', attempts: 2 });

    ehr.setFault('none');
    await dueNow(s.id);
    await work();
    d = await deliveryOf(s.id);
    expect(d).toMatchObject({ status: 'delivered', attempts: 3, last_error: null, next_attempt_at: null });
    expect(receivedFor(s).map((r) => r.outcome)).toEqual(['accepted']);
    expect(reportsFor(s)).toHaveLength(1);
    expect(await jobOf(s.id)).toBeUndefined();
  });

  it('a connection dropped mid-request is retried like a 503', async () => {
    const s = await signedStudy();
    await enqueue(s.id);
    ehr.setFault('drop');
    await work();
    expect(await deliveryOf(s.id)).toMatchObject({ status: 'failed-retrying', attempts: 1 });
    ehr.setFault('none');
    await dueNow(s.id);
    await work();
    expect(await deliveryOf(s.id)).toMatchObject({ status: 'delivered', attempts: 2 });
    expect(reportsFor(s)).toHaveLength(1);
  });

  it('gives up once the time limit since the first try has passed, and stops the job', async () => {
    const s = await signedStudy();
    await enqueue(s.id);
    ehr.setFault('unavailable');
    await work(tasksWith(1)); // a limit of 1 ms: passed by the time the first answer arrives
    const d = await deliveryOf(s.id);
    expect(d.status).toBe('given-up');
    expect(d.last_error).toMatch(/^EHR answered 503; gave up after the time limit/);
    expect(d.stopped_at).toBeInstanceOf(Date);
    expect(await jobOf(s.id)).toBeUndefined();
    expect((await listDeliveriesNeedingAttention(db, { statuses: ['given-up'] })).map((i) => i.reportVersionId)).toContain(s.id);
  });
});

describe('a bundle the EHR refuses', () => {
  it('is recorded as rejected with the EHR issues, and not retried', async () => {
    const s = await signedStudy();
    // The EHR already holds a different bundle under this version's Bundle.identifier, so it refuses ours (409).
    const row = (await db.query(`SELECT * FROM report_version v JOIN report_pdf f ON f.report_version_id = v.id WHERE v.id = $1`, [s.id]))[0];
    const other = reportBundleInputOf(
      { id: row.id, studyId: row.study_id, versionNo: 1, status: 'final', snapshot: row.snapshot, analysis: row.analysis, thresholds: row.thresholds, pdf: row.pdf, pdfSha256: row.pdf_sha256, signerName: row.signer_name, signedAt: row.signed_at },
      { identifierSystems, operatorName: 'Dr Invented Operator' },
    );
    expect((await client.sendTransaction(toReportBundle({ ...other, conclusion: 'A different conclusion under the same identifier.' }))).ok).toBe(true);

    await enqueue(s.id);
    await work();
    const d = await deliveryOf(s.id);
    expect(d).toMatchObject({ status: 'rejected', attempts: 1, http_status: 409, last_error: 'EHR answered 409' });
    // The EHR's OperationOutcome (FHIR R4 OperationOutcome.issue: severity and code are required).
    expect(d.issues.length).toBeGreaterThan(0);
    expect(d.issues[0]).toHaveProperty('severity');
    expect(d.issues[0]).toHaveProperty('code');
    expect(await jobOf(s.id)).toBeUndefined(); // the job ended without error: nothing to retry

    const sent = receivedFor(s).length;
    await work();
    await enqueue(s.id); // a stray second job leaves a rejected delivery alone
    await work();
    expect(receivedFor(s).length).toBe(sent);
    expect((await deliveryOf(s.id)).status).toBe('rejected');
    // The administrators' list shows the accession and the issues' codes, not the EHR's free text.
    const listed = (await listDeliveriesNeedingAttention(db, { statuses: ['rejected'] })).find((i) => i.reportVersionId === s.id)!;
    expect(listed).toMatchObject({ accession: s.accession, status: 'rejected', httpStatus: 409 });
    expect(listed.issues.every((i) => !('diagnostics' in i))).toBe(true);

    // The administrators are told once: one notice job per version, however often the stop is reached.
    const notices = await db.query(
      `SELECT j.payload FROM graphile_worker._private_jobs j JOIN graphile_worker._private_tasks t ON t.id = j.task_id
        WHERE t.identifier = 'send-delivery-failure-notice' AND j.key = $1`,
      [`delivery-failed:${s.id}`],
    );
    expect(notices).toEqual([{ payload: { reportVersionId: s.id } }]);
    // The notice itself: to every administrator, accession and the EHR's answer, nothing clinical.
    const adminEmail = `admin-${randomUUID().slice(0, 8)}@hospital.example`;
    await db.query(`INSERT INTO app_user (issuer, subject, email, display_name, role) VALUES ('test', $1, $1, 'Invented Admin', 'admin')`, [adminEmail]);
    const smtp = await startFakeSmtp({ port: 0, httpPort: 0 });
    try {
      await sendDeliveryFailureNoticeTask(db, { host: '127.0.0.1', port: smtp.port, from: 'isobar@localhost' })({ reportVersionId: s.id }, {} as never);
      expect(smtp.caught).toHaveLength(1);
      expect(smtp.caught[0].to).toContain(adminEmail);
      expect(smtp.caught[0].raw).toContain(s.accession);
      expect(smtp.caught[0].raw).toMatch(/refused the report \(HTTP 409\)/);
      expect(smtp.caught[0].raw).not.toMatch(/Testperson|impression|FFR/i);
    } finally {
      await smtp.close();
      await db.query(`DELETE FROM app_user WHERE email = $1`, [adminEmail]).catch(() => undefined);
    }
  });

  it('a signed version that cannot be made into a bundle is rejected before anything is sent', async () => {
    const s = await signedStudy((snap) => {
      snap.details.procedureStartedAt = null;
    });
    await enqueue(s.id);
    await work();
    const d = await deliveryOf(s.id);
    expect(d.status).toBe('rejected');
    expect(d.last_error).toContain('snapshot.details.procedureStartedAt');
    expect(receivedFor(s)).toHaveLength(0);
    expect(await jobOf(s.id)).toBeUndefined();
  });
});

describe('sending again', () => {
  it('is idempotent: the EHR recognises the resend by Bundle.identifier and keeps one report', async () => {
    const s = await signedStudy();
    await enqueue(s.id);
    await work();
    const first = await deliveryOf(s.id);
    expect(first.status).toBe('delivered');

    await requeueDelivery(db, s.id, operatorId);
    expect(await deliveryOf(s.id)).toMatchObject({ status: 'queued', resend_requested_by: operatorId });
    await work();
    const again = await deliveryOf(s.id);
    expect(again).toMatchObject({ status: 'delivered', attempts: 2 });
    // FHIR R4 Bundle.identifier: "persistent identifier for the bundle" — the stand-in answers a known one from what it stored.
    expect(receivedFor(s).map((r) => r.outcome)).toEqual(['accepted', 'resend']);
    expect(reportsFor(s)).toHaveLength(1);
    expect(again.ehr_ids).toEqual(first.ehr_ids);
    expect(again.ehr_report_id).toBe(first.ehr_report_id);
  });

  it('a rejected delivery sent again is tried again, and the same cause rejects it again', async () => {
    const s = await signedStudy((snap) => {
      snap.details.procedureStartedAt = null;
    });
    await enqueue(s.id);
    await work();
    expect((await deliveryOf(s.id)).status).toBe('rejected');
    // The stored version stays as signed (append-only), so the same cause rejects it again.
    await requeueDelivery(db, s.id, operatorId);
    await work();
    expect(await deliveryOf(s.id)).toMatchObject({ status: 'rejected', attempts: 2 });
  });

  it('only one sender at a time: a second sender finds the delivery claimed and retries later', async () => {
    const s = await signedStudy();
    await enqueue(s.id);
    let sends = 0;
    let release!: () => void;
    const gate = new Promise<void>((resolve) => (release = resolve));
    const slowSend = async (bundle: Parameters<EhrClient['sendTransaction']>[0]) => {
      sends++;
      await gate;
      return client.sendTransaction(bundle);
    };
    const deps = { db: db.manager, send: slowSend, limitMs: DAY, leaseMs: 60_000, identifierSystems };
    const first = deliverReport(deps, s.id, { attempts: 1, maxAttempts: 25 });
    // Wait (bounded) until the first sender is inside its send.
    for (let i = 0; i < 100 && sends === 0; i++) await new Promise((r) => setTimeout(r, 50));
    expect(sends).toBe(1);
    await expect(deliverReport(deps, s.id, { attempts: 1, maxAttempts: 25 })).rejects.toBeInstanceOf(TransientDeliveryError);
    release();
    expect(await first).toMatchObject({ result: 'delivered' });
    expect(sends).toBe(1);
    // Once delivered, a later job does nothing.
    expect(await deliverReport(deps, s.id, { attempts: 1, maxAttempts: 25 })).toEqual({ result: 'left-alone', status: 'delivered' });
    expect(receivedFor(s)).toHaveLength(1);
  });

  it('a sender that died mid-send leaves a lease that expires; the next try sends again and the EHR keeps one report', async () => {
    const s = await signedStudy();
    await enqueue(s.id);
    await work();
    // As if a process had claimed a resend and been killed before recording the answer.
    await db.query(`UPDATE report_delivery SET status = 'sending', lease_until = now() - interval '1 second' WHERE report_version_id = $1`, [s.id]);
    await enqueue(s.id);
    await work();
    expect((await deliveryOf(s.id)).status).toBe('delivered');
    expect(receivedFor(s).map((r) => r.outcome)).toEqual(['accepted', 'resend']);
    expect(reportsFor(s)).toHaveLength(1);
  });
});

describe('an addendum', () => {
  it('is sent as the same DiagnosticReport with status amended, naming the version it amends', async () => {
    let snapshot: Record<string, any> = {};
    const s = await signedStudy((snap) => {
      snapshot = snap;
    });
    await enqueue(s.id);
    await work();
    expect((await deliveryOf(s.id)).status).toBe('delivered');

    const amendedSnapshot = { ...snapshot, findings: { impression: 'Invented amended impression: proximal LAD stenosis, FFR 0.80.' } };
    const v2 = await insertVersion(s.studyId, 2, 'amended', s.id, amendedSnapshot, snapshot.vessels[0].id);
    await enqueue(v2);
    await work();

    const d = await deliveryOf(v2);
    expect(d).toMatchObject({ status: 'delivered', bundle_identifier: bundleIdOf(s, 2) });
    const reports = reportsFor(s);
    // One report per study: the addendum is a conditional update of the same DiagnosticReport (FHIR R4 http.html#cond-update).
    expect(reports).toHaveLength(1);
    // FHIR R4 DiagnosticReport.status "amended": the report has been modified subsequent to being final.
    expect(reports[0].status).toBe('amended');
    expect(reports[0].meta?.versionId).toBe('2');
    expect(reports[0].conclusion).toBe('Invented amended impression: proximal LAD stenosis, FFR 0.80.');
    expect(reports[0].presentedForm![0].title).toContain('amends version 1');
    expect(reports[0].presentedForm![0].hash).toBe(createHash('sha1').update(pdfOf(s.studyId, 2)).digest('base64'));
    expect(d.ehr_report_id).toBe(`DiagnosticReport/${reports[0].id}`);
    // FHIR R4 Observation.status "amended" for the updated observations.
    const observations = (ehr.resources('Observation') as Observation[]).filter((o) => reports[0].result!.some((r) => r.reference === `Observation/${o.id}`));
    expect(observations.length).toBeGreaterThan(0);
    expect(observations.every((o) => o.status === 'amended')).toBe(true);

    const listed = await listStudyDeliveries(db, s.studyId);
    expect(listed.map((l) => [l.versionNo, l.reportStatus, l.status])).toEqual([
      [2, 'amended', 'delivered'],
      [1, 'final', 'delivered'],
    ]);
  });
});
