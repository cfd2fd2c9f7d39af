import { randomUUID } from 'node:crypto';
import diagnosticsChannel from 'node:diagnostics_channel';
import pg from 'pg';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { emptyFindings, emptyVessel, type StudyRecord } from '../../shared/study/schema';
import { openTestDatabase } from '../support/app';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';
import { pdfRenderedChannel } from '../../server/report-document/pdf';

// The sign-and-amend workflow is the product's design (common practice: a signed report changes only by addendum).
let db: DataSource;
let stack: TestStack;
let staff: string;
let physician: string;
let coder: string;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
  staff = (await signIn(stack, usernameOf('staff'))).cookie;
  physician = (await signIn(stack, usernameOf('physician'))).cookie;
  coder = (await signIn(stack, usernameOf('coder'))).cookie;
});
afterAll(async () => {
  await stack.close();
  await db.destroy();
});

const api = () => request(stack.url);
const send = (method: 'post' | 'patch', path: string, cookie: string) => api()[method](path).set('Cookie', cookie).set('Origin', stack.url);

/** A complete lesion study: FFR 72/90 = 0.80 (abnormal, ≤ 0.80 — ESC 2024), drift 1.00, complications "none". */
async function completeStudy(): Promise<StudyRecord> {
  const created = await send('post', '/api/studies', staff)
    .send({ patient: { mrn: `S-${randomUUID().slice(0, 8)}`, familyName: 'Varnhagen', givenName: 'Tove', birthDate: '1959-02-11', sex: 'female' } })
    .expect(201);
  const operators = await api().get('/api/operators').set('Cookie', staff).expect(200);
  const study: StudyRecord = created.body;
  const res = await send('patch', `/api/studies/${study.id}`, staff)
    .send({
      version: study.version,
      details: { ...study.details, indication: 'Intermediate LAD lesion <b>on CT</b>', clinicalQuestion: 'intermediate-lesion', operatorId: operators.body.items[0].id },
      vessels: [{ ...emptyVessel(randomUUID(), 'LAD'), restPa: 100, restPd: 95, hyperemiaPa: 90, hyperemiaPd: 72, driftPdPa: 1.0, decision: 'pci' }],
      findings: { ...emptyFindings(), complicationKinds: ['none'], impression: 'Significant LAD lesion.', plan: 'Stent.' },
    })
    .expect(200);
  return res.body;
}

describe('report preview and signing', () => {
  it('previews with every missing item at once, each pointing at its field, and refuses to sign an incomplete study', async () => {
    const created = await send('post', '/api/studies', staff)
      .send({ patient: { mrn: `S-${randomUUID().slice(0, 8)}`, familyName: 'Okafor', givenName: 'Lumi', birthDate: '1970-05-05', sex: 'male' } })
      .expect(201);
    const preview = await api().get(`/api/studies/${created.body.id}/report`).set('Cookie', physician).expect(200);
    expect(preview.body.completeness.complete).toBe(false);
    expect(preview.body.completeness.missing.map((m: { code: string }) => m.code)).toEqual(expect.arrayContaining(['indication', 'no-vessel', 'complications']));
    const res = await send('post', `/api/studies/${created.body.id}/sign`, physician).send({ version: preview.body.studyVersion }).expect(422);
    expect(res.body.errors.map((e: { pointer: string }) => e.pointer)).toEqual(expect.arrayContaining(['/details/indication']));
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM report_version WHERE study_id = $1`, [created.body.id]);
    expect(n).toBe(0);
  });

  it('signs exactly the previewed version: one immutable version, PDF and fingerprint, audit row and follow-up jobs', async () => {
    const study = await completeStudy();
    await send('post', `/api/studies/${study.id}/transitions`, staff).send({ action: 'mark-ready', version: study.version }).expect(200);
    const preview = await api().get(`/api/studies/${study.id}/report`).set('Cookie', physician).expect(200);
    expect(preview.body.completeness).toEqual({ complete: true, missing: [] });
    expect(preview.body.actions).toContain('sign');
    // Free text is escaped, never rendered as markup.
    expect(preview.body.html).toContain('&lt;b&gt;on CT&lt;/b&gt;');
    const signed = await send('post', `/api/studies/${study.id}/sign`, physician).send({ version: preview.body.studyVersion }).expect(201);
    expect(signed.body).toMatchObject({ versionNo: 1, status: 'final' });
    expect(signed.body.contentSha256).toMatch(/^[0-9a-f]{64}$/);
    const pdf = await api().get(`/api/reports/${signed.body.id}/pdf`).set('Cookie', coder).buffer(true).parse((res, cb) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => cb(null, Buffer.concat(chunks)));
    }).expect(200);
    expect(pdf.headers['content-type']).toBe('application/pdf');
    expect((pdf.body as Buffer).subarray(0, 5).toString()).toBe('%PDF-');
    expect(pdf.headers['x-content-sha256']).toBe(signed.body.pdfSha256);
    const [row] = await db.query(`SELECT state FROM study WHERE id = $1`, [study.id]);
    expect(row.state).toBe('signed');
    const audit = await db.query(`SELECT action FROM audit_event WHERE entity_id = $1 AND action IN ('mark-ready', 'sign') ORDER BY id`, [study.id]);
    expect(audit.map((a: { action: string }) => a.action)).toEqual(['mark-ready', 'sign']);
    const jobs = await db.query(
      `SELECT t.identifier FROM graphile_worker._private_jobs j JOIN graphile_worker._private_tasks t ON t.id = j.task_id
       WHERE j.payload->>'reportVersionId' = $1 ORDER BY t.identifier`,
      [signed.body.id],
    );
    expect(jobs.map((j: { identifier: string }) => j.identifier)).toEqual(['deliver-report', 'send-report-notice']);
    // The code suggestions were made in the signing transaction itself: stored with their rule ids
    // when the answer arrives, no job needed, and the study is on the coding queue.
    const lines = await db.query(
      `SELECT l.code, l.rule_id FROM code_line l JOIN code_suggestion_set s ON s.id = l.set_id WHERE s.report_version_id = $1 ORDER BY l.position`,
      [signed.body.id],
    );
    expect(lines.length).toBeGreaterThan(0);
    for (const l of lines) expect(l.rule_id).toMatch(/^[a-z0-9-]+(\.[a-z0-9-]+)+$/);
    // FFR measured in the LAD: the first-vessel physiology code (CPT 93571 descriptor).
    expect(lines).toContainEqual({ code: '93571', rule_id: 'cpt.physiology.first-vessel' });
    const [queued] = await db.query(`SELECT status, queued_at FROM coding_review WHERE study_id = $1`, [study.id]);
    expect(queued.status).toBe('to-code');
    expect(new Date(queued.queued_at).toISOString()).toBe(signed.body.signedAt);
    // Written in the signing statement with the version: the job keys and tries, the queued delivery, the audit detail.
    const keyed = await db.query(`SELECT key, max_attempts FROM graphile_worker._private_jobs WHERE payload->>'reportVersionId' = $1 ORDER BY key`, [signed.body.id]);
    expect(keyed).toEqual([
      { key: `deliver-report:${signed.body.id}`, max_attempts: 500 },
      { key: `notice:${signed.body.id}`, max_attempts: 25 },
    ]);
    const deliveries = await db.query(`SELECT study_id FROM report_delivery WHERE report_version_id = $1`, [signed.body.id]);
    expect(deliveries).toEqual([{ study_id: study.id }]);
    const [stored] = await db.query(
      `SELECT v.version_no, v.study_version, v.status, v.supersedes_id, f.pdf_sha256, v.content_sha256, v.signed_at, v.signer_name, v.attestation, v.thresholds_basis,
              encode(sha256(f.pdf), 'hex') AS pdf_digest, s.version AS study_now
       FROM report_version v JOIN study s ON s.id = v.study_id JOIN report_pdf f ON f.report_version_id = v.id WHERE v.id = $1`,
      [signed.body.id],
    );
    expect(stored).toMatchObject({ version_no: 1, study_version: preview.body.studyVersion, status: 'final', supersedes_id: null, thresholds_basis: 'in-force', study_now: preview.body.studyVersion + 1 });
    expect(stored.pdf_digest).toBe(stored.pdf_sha256);
    expect(stored.signed_at.toISOString()).toBe(signed.body.signedAt);
    expect(stored.attestation).toMatch(/^I performed or supervised this procedure/);
    const [signAudit] = await db.query(`SELECT actor_name, detail FROM audit_event WHERE entity_id = $1 AND action = 'sign'`, [study.id]);
    expect(signAudit.actor_name).toBe(stored.signer_name);
    expect(signAudit.detail).toMatchObject({ reportVersion: 1, reportVersionId: signed.body.id, fromStudyVersion: preview.body.studyVersion, contentSha256: stored.content_sha256, thresholds: { basis: 'in-force' } });
    // Verify: by the PDF's bytes and by the printed fingerprint.
    const byPdf = await send('post', '/api/reports/verify', coder).set('Content-Type', 'application/pdf').send(pdf.body).expect(200);
    expect(byPdf.body).toMatchObject({ found: true, studyId: study.id, versionNo: 1, supersededBy: null });
    const byPrint = await send('post', '/api/reports/verify', coder).send({ fingerprint: signed.body.contentSha256.slice(0, 16) }).expect(200);
    expect(byPrint.body).toMatchObject({ found: true, versionNo: 1 });
    expect((await send('post', '/api/reports/verify', coder).send({ fingerprint: 'ffffffffffffffff' }).expect(200)).body).toEqual({ found: false });
  });

  it('refuses a signature for a study changed since the preview (409 with the current record), and a non-physician', async () => {
    const study = await completeStudy();
    await send('post', `/api/studies/${study.id}/sign`, staff).send({ version: study.version }).expect(403);
    await send('patch', `/api/studies/${study.id}`, staff).send({ version: study.version, findings: { ...study.findings, plan: 'Changed plan.' } }).expect(200);
    const res = await send('post', `/api/studies/${study.id}/sign`, physician).send({ version: study.version }).expect(409);
    expect(res.body.current.findings.plan).toBe('Changed plan.');
  });

  it('the preview cautions when the impression gives a value the study did not measure, and signing stays possible', async () => {
    const study = await completeStudy(); // FFR 72/90 = 0.80
    const saved = await send('patch', `/api/studies/${study.id}`, staff)
      .send({ version: study.version, findings: { ...study.findings, impression: 'Significant LAD lesion, FFR 0.86.' } })
      .expect(200);
    const preview = await api().get(`/api/studies/${study.id}/report`).set('Cookie', physician).expect(200);
    expect(preview.body.writtenValues).toEqual([expect.objectContaining({ field: 'impression', index: 'FFR', written: 'FFR 0.86', measured: ['LAD 0.80'] })]);
    expect(preview.body.completeness.complete).toBe(true);
    await send('post', `/api/studies/${study.id}/sign`, physician).send({ version: saved.body.version }).expect(201);
  });

  it('two physicians signing at once make exactly one version; the other gets 409', async () => {
    const study = await completeStudy();
    const second = (await signIn(stack, usernameOf('physician'))).cookie;
    const results = await Promise.all([physician, second].map((c) => send('post', `/api/studies/${study.id}/sign`, c).send({ version: study.version })));
    expect(results.map((r) => r.status).sort()).toEqual([201, 409]);
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM report_version WHERE study_id = $1`, [study.id]);
    expect(n).toBe(1);
    // The refused signature stored no suggestions of its own: one set, for the one version.
    const [{ sets }] = await db.query(`SELECT count(*)::int AS sets FROM code_suggestion_set WHERE study_id = $1`, [study.id]);
    expect(sets).toBe(1);
  });

  it('changes after signing go through an addendum with a reason, making version 2 that supersedes version 1; edits are refused while signed', async () => {
    const study = await completeStudy();
    const v1 = await send('post', `/api/studies/${study.id}/sign`, physician).send({ version: study.version }).expect(201);
    const signedNow = (await api().get(`/api/studies/${study.id}`).set('Cookie', physician).expect(200)).body as StudyRecord;
    await send('patch', `/api/studies/${study.id}`, physician).send({ version: signedNow.version, findings: { ...signedNow.findings, plan: 'x' } }).expect(409);
    const opened = await send('post', `/api/studies/${study.id}/transitions`, physician).send({ action: 'open-addendum', version: signedNow.version }).expect(200);
    expect(opened.body.state).toBe('amending');
    const edited = await send('patch', `/api/studies/${study.id}`, physician).send({ version: opened.body.version, findings: { ...opened.body.findings, plan: 'Stent, then cardiac rehabilitation.' } }).expect(200);
    await send('post', `/api/studies/${study.id}/sign`, physician).send({ version: edited.body.version }).expect(422);
    const v2 = await send('post', `/api/studies/${study.id}/sign`, physician).send({ version: edited.body.version, reason: 'Plan completed' }).expect(201);
    expect(v2.body).toMatchObject({ versionNo: 2, status: 'amended' });
    const [row] = await db.query(`SELECT supersedes_id, reason FROM report_version WHERE id = $1`, [v2.body.id]);
    expect(row).toEqual({ supersedes_id: v1.body.id, reason: 'Plan completed' });
    // The addendum's signature made its own suggestion set, linked to the first version's.
    const sets = await db.query(`SELECT version_no, previous_set_id IS NOT NULL AS linked FROM code_suggestion_set WHERE study_id = $1 ORDER BY version_no`, [study.id]);
    expect(sets).toEqual([{ version_no: 1, linked: false }, { version_no: 2, linked: true }]);
    const verify = await send('post', '/api/reports/verify', coder).send({ fingerprint: v1.body.contentSha256 }).expect(200);
    expect(verify.body.supersededBy).toMatchObject({ versionNo: 2 });
  });

  it('a discarded addendum puts the record back exactly as signed', async () => {
    const study = await completeStudy();
    await send('post', `/api/studies/${study.id}/sign`, physician).send({ version: study.version }).expect(201);
    const signedNow = (await api().get(`/api/studies/${study.id}`).set('Cookie', physician).expect(200)).body as StudyRecord;
    const opened = await send('post', `/api/studies/${study.id}/transitions`, physician).send({ action: 'open-addendum', version: signedNow.version }).expect(200);
    const edited = await send('patch', `/api/studies/${study.id}`, physician).send({ version: opened.body.version, findings: { ...opened.body.findings, plan: 'Not meant' } }).expect(200);
    const back = await send('post', `/api/studies/${study.id}/transitions`, physician).send({ action: 'discard-addendum', version: edited.body.version }).expect(200);
    expect(back.body.state).toBe('signed');
    expect(back.body.findings.plan).toBe('Stent.');
  });

  it('a signed version can be neither changed nor deleted, even with SQL', async () => {
    const study = await completeStudy();
    const v = await send('post', `/api/studies/${study.id}/sign`, physician).send({ version: study.version }).expect(201);
    await expect(db.query(`UPDATE report_version SET signer_name = 'someone else' WHERE id = $1`, [v.body.id])).rejects.toThrow(/append-only|permission denied/);
    await expect(db.query(`DELETE FROM report_version WHERE id = $1`, [v.body.id])).rejects.toThrow(/append-only|permission denied/);
    await expect(db.query(`UPDATE report_pdf SET pdf = '\\x00' WHERE report_version_id = $1`, [v.body.id])).rejects.toThrow(/append-only|permission denied/);
    await expect(db.query(`DELETE FROM report_pdf WHERE report_version_id = $1`, [v.body.id])).rejects.toThrow(/append-only|permission denied/);
    const [kept] = await db.query(`SELECT encode(sha256(pdf), 'hex') = pdf_sha256 AS intact FROM report_pdf WHERE report_version_id = $1`, [v.body.id]);
    expect(kept.intact).toBe(true);
  });

  it('a version without its PDF is refused when the transaction commits', async () => {
    const study = await completeStudy();
    const v = await send('post', `/api/studies/${study.id}/sign`, physician).send({ version: study.version }).expect(201);
    const copy = db.transaction(async (m) => {
      await m.query(
        `INSERT INTO report_version (study_id, version_no, study_version, status, supersedes_id, narrative_html, narrative_text, snapshot, analysis, thresholds,
                                     template_version, content_sha256, signed_by, signer_name, signed_at, attestation)
         SELECT study_id, 2, study_version, 'amended', id, narrative_html, narrative_text, snapshot, analysis, thresholds,
                template_version, content_sha256, signed_by, signer_name, now(), attestation
         FROM report_version WHERE id = $1`,
        [v.body.id],
      );
    });
    await expect(copy).rejects.toThrow(/has no PDF/);
    const versions = await db.query(`SELECT version_no FROM report_version WHERE study_id = $1`, [study.id]);
    expect(versions).toEqual([{ version_no: 1 }]);
  });

  it('send-back needs a reason; a coder cannot move a study', async () => {
    const study = await completeStudy();
    await send('post', `/api/studies/${study.id}/transitions`, coder).send({ action: 'mark-ready', version: study.version }).expect(403);
    const ready = await send('post', `/api/studies/${study.id}/transitions`, staff).send({ action: 'mark-ready', version: study.version }).expect(200);
    const res = await send('post', `/api/studies/${study.id}/transitions`, physician).send({ action: 'send-back', version: ready.body.version }).expect(422);
    expect(res.body.errors[0].pointer).toBe('/reason');
    const back = await send('post', `/api/studies/${study.id}/transitions`, physician).send({ action: 'send-back', version: ready.body.version, reason: 'The circumflex is missing' }).expect(200);
    expect(back.body.state).toBe('draft');
  });
});

describe('the database ends the signing connection while the PDF renders', () => {
  it('answers with a problem, keeps the process alive, and leaves the study unsigned', async () => {
    const study = await completeStudy();
    // When the PDF is ready the signature's connection sits idle in its transaction: end it from
    // outside (a connected client sends at once), and hold this process until the server has done so.
    const killer = new pg.Client({ connectionString: (db.options as { url: string }).url });
    await killer.connect();
    const ended: Promise<unknown>[] = [];
    const onPdf = () => {
      ended.push(killer.query(`SELECT pg_terminate_backend(pid) FROM pg_stat_activity WHERE datname = current_database() AND state = 'idle in transaction' AND pid <> pg_backend_pid()`));
      const until = Date.now() + 300;
      while (Date.now() < until); // the database ends the connection meanwhile
    };
    diagnosticsChannel.subscribe(pdfRenderedChannel.name, onPdf);
    let res;
    try {
      res = await send('post', `/api/studies/${study.id}/sign`, physician).send({ version: study.version });
    } finally {
      diagnosticsChannel.unsubscribe(pdfRenderedChannel.name, onPdf);
    }
    const [terminated] = (await Promise.all(ended)) as Array<{ rows: Array<{ pg_terminate_backend: boolean }> }>;
    await killer.end();
    expect(terminated.rows.map((r) => r.pg_terminate_backend)).toEqual([true]);
    expect(res.status).toBeGreaterThanOrEqual(500);
    expect(res.headers['content-type']).toMatch(/problem\+json/);
    // Still serving, and nothing was signed.
    await api().get('/api/health').expect((r) => expect(r.status).toBeLessThan(600));
    const after = await api().get(`/api/studies/${study.id}`).set('Cookie', physician).expect(200);
    expect(after.body.state).toBe('draft');
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM report_version WHERE study_id = $1`, [study.id]);
    expect(n).toBe(0);
  });
});
