import { randomUUID } from 'node:crypto';
import { createServer } from 'node:net';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { Logger, runOnce } from 'graphile-worker';
import { defaultThresholds } from '../../shared/physiology/thresholds';
import { emptyFindings, emptyVessel, type StudyRecord } from '../../shared/study/schema';
import { createDeliveryTasks } from '../../server/ehr/tasks';
import { startFakeSmtp } from '../../server/fakes/smtp';
import { sendReportNoticeTask } from '../../server/mail/send-report-notice';
import { defaultsFrom, labSettings } from '../../server/settings/queries/lab-settings';
import { thresholdsInForce } from '../../server/settings/queries/thresholds';
import { openTestDatabase } from '../support/app';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

let db: DataSource;
let stack: TestStack;
let staff: string;
let physician: string;
let admin: string;
let chief: string;

const allowedHostsBefore = process.env.EHR_ALLOWED_HOSTS;
beforeAll(async () => {
  // The hosts these tests point EHR delivery at, as a hospital lists its EHR's hosts in the configuration.
  process.env.EHR_ALLOWED_HOSTS = 'ehr.hospital.example,127.0.0.1:9';
  db = await openTestDatabase();
  stack = await startStack(db);
  staff = (await signIn(stack, usernameOf('staff'))).cookie;
  physician = (await signIn(stack, usernameOf('physician'))).cookie;
  admin = (await signIn(stack, usernameOf('admin'))).cookie;
  chief = (await signIn(stack, usernameOf('chief'))).cookie;
});

afterAll(async () => {
  if (allowedHostsBefore === undefined) delete process.env.EHR_ALLOWED_HOSTS;
  else process.env.EHR_ALLOWED_HOSTS = allowedHostsBefore;
  // Leave the lab as the next test file expects it: published thresholds, template v1, default settings.
  const inForce = await thresholdsInForce(db);
  const back = Object.fromEntries(Object.entries(defaultThresholds).filter(([k, v]) => inForce.values[k as keyof typeof defaultThresholds] !== v));
  if (Object.keys(back).length) await send('post', '/api/admin/thresholds', admin).send({ values: back, note: 'back to the published values' }).expect(201);
  await send('post', '/api/admin/report-templates/active', admin).send({ version: 'v1' }).expect(200);
  const view = await api().get('/api/admin/lab-settings').set('Cookie', admin).expect(200);
  await send('put', '/api/admin/lab-settings', admin)
    .send({ version: view.body.version, settings: { timeZone: 'UTC', signatureTargetHours: 24, ehrBaseUrl: null, mailFrom: null } })
    .expect(200);
  await stack.close();
  await db.destroy();
});

const api = () => request(stack.url);
const send = (method: 'post' | 'put' | 'patch', path: string, cookie: string) => api()[method](path).set('Cookie', cookie).set('Origin', stack.url);
const lastSettingsAudit = async (entityId: string) =>
  (await db.query(`SELECT * FROM audit_event WHERE entity_type = 'settings' AND entity_id = $1 AND action <> 'read' ORDER BY id DESC LIMIT 1`, [entityId]))[0];

/**
 * A complete lesion study, ready to sign: FFR 81/90 = 0.90 (not significant, > 0.80 — ESC 2024), CFR
 * from thermodilution 0.66 / 0.30 = 2.20, IMR 81 × 0.30 = 24.3 (< 25 — ESC 2024; EAPCI 2020).
 * CFR 2.20 lies between the published cut-off 2.0 (EAPCI 2020) and 2.5 (ESC 2024), so it is normal under
 * the first and abnormal under the second. Values computed by hand from the formulas (not from a paper).
 */
async function readyStudy(): Promise<StudyRecord> {
  const created = await send('post', '/api/studies', staff)
    .send({ patient: { mrn: `A-${randomUUID().slice(0, 8)}`, familyName: 'Lindqvist', givenName: 'Maren', birthDate: '1961-09-14', sex: 'female' } })
    .expect(201);
  const operators = await api().get('/api/operators').set('Cookie', staff).expect(200);
  const study: StudyRecord = created.body;
  const res = await send('patch', `/api/studies/${study.id}`, staff)
    .send({
      version: study.version,
      details: { ...study.details, encounter: `ENC-${study.accession}`, procedureStartedAt: new Date(Date.now() - 3 * 3_600_000).toISOString(), procedureEndedAt: new Date(Date.now() - 2 * 3_600_000).toISOString(), indication: 'Intermediate LAD lesion', clinicalQuestion: 'intermediate-lesion', operatorId: operators.body.items[0].id, referringEmail: 'referrer@hospital.example' },
      vessels: [
        {
          ...emptyVessel(randomUUID(), 'LAD'),
          restPa: 100,
          restPd: 95,
          hyperemiaPa: 90,
          hyperemiaPd: 81,
          restTransit: [0.66, 0.66, 0.66],
          hyperemiaTransit: [0.3, 0.3, 0.3],
          driftPdPa: 1.0,
          decision: 'defer',
        },
      ],
      findings: { ...emptyFindings(), complicationKinds: ['none'], impression: 'No significant LAD lesion.', plan: 'Medical therapy.' },
    })
    .expect(200);
  return res.body;
}

async function sign(studyId: string, body: Record<string, unknown> = {}) {
  const preview = await api().get(`/api/studies/${studyId}/report`).set('Cookie', physician).expect(200);
  const res = await send('post', `/api/studies/${studyId}/sign`, physician).send({ version: preview.body.studyVersion, ...body });
  return res;
}

const versionRow = async (id: string) => (await db.query(`SELECT v.*, f.pdf_sha256 FROM report_version v JOIN report_pdf f ON f.report_version_id = v.id WHERE v.id = $1`, [id]))[0];
const cfrOf = (row: { analysis: { vessels: Array<{ cfr?: number; cfrFlag?: string }> } }) => row.analysis.vessels[0];

describe('thresholds: range checks', () => {
  it.each([
    ['a CFR cut-off above 2.5 (EAPCI 2020 2.0 … ESC 2024 2.5)', { cfr: 2.6 }, '/values/cfr', /CFR cut-off must be between 2\.00 and 2\.50/],
    ['a CFR cut-off below 2.0', { cfr: 1.9 }, '/values/cfr', /CFR cut-off must be between 2\.00 and 2\.50/],
    ['a CFR cut-off finer than the two decimals it is judged at', { cfr: 2.255 }, '/values/cfr', /steps of 0\.01/],
    ['an FFR cut-off of 0.85 (DEFER 0.75 … FAME 0.80)', { ffr: 0.85 }, '/values/ffr', /FFR cut-off must be between 0\.75 and 0\.80/],
    ['an IMR cut-off of 60 (common practice: 20–40)', { imr: 60 }, '/values/imr', /IMR cut-off must be between 20 and 40/],
    ['a CFR cut-off given as text', { cfr: '2.3' }, '/values/cfr', /CFR cut-off must be a number/],
    ['a grey zone above the FFR cut-off (DEFER/FAME)', { ffr: 0.78, ffrGreyZoneLow: 0.8 }, '/values/ffrGreyZoneLow', /must not be above the FFR cut-off/],
    ['a drift window upside down (common practice)', { driftLow: 1.0, driftHigh: 1.0 }, '/values/driftHigh', /must be above the drift lower limit/],
  ])('refuses %s with 400 naming the field', async (_what, values, pointer, message) => {
    const before = await db.query(`SELECT count(*)::int AS n FROM threshold_set`);
    const res = await send('post', '/api/admin/thresholds', admin).send({ values }).expect(400);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    const problem = res.body.errors.find((e: { pointer: string }) => e.pointer === pointer);
    expect(problem, JSON.stringify(res.body.errors)).toBeTruthy();
    expect(problem.detail).toMatch(message);
    expect(await db.query(`SELECT count(*)::int AS n FROM threshold_set`)).toEqual(before);
  });

  it('refuses an unknown threshold, a date in the past, a time in the past and a change that changes nothing', async () => {
    const unknown = await send('post', '/api/admin/thresholds', admin).send({ values: { cfrr: 2.2 } }).expect(400);
    expect(unknown.body.errors[0]).toMatchObject({ pointer: '/values' });
    expect(unknown.body.errors[0].detail).toMatch(/Unknown threshold\(s\): cfrr/);
    const yesterday = new Date(Date.now() - 36 * 3_600_000).toISOString().slice(0, 10);
    const past = await send('post', '/api/admin/thresholds', admin).send({ values: { cfr: 2.3 }, effectiveFrom: yesterday }).expect(400);
    expect(past.body.errors[0]).toMatchObject({ pointer: '/effectiveFrom' });
    expect(past.body.errors[0].detail).toMatch(/today .* or later/);
    const earlier = await send('post', '/api/admin/thresholds', admin).send({ values: { cfr: 2.3 }, effectiveFrom: new Date(Date.now() - 3_600_000).toISOString() }).expect(400);
    expect(earlier.body.errors[0]).toMatchObject({ pointer: '/effectiveFrom' });
    const inForce = await thresholdsInForce(db);
    const same = await send('post', '/api/admin/thresholds', admin).send({ values: { cfr: inForce.values.cfr } }).expect(400);
    expect(same.body.errors[0]).toMatchObject({ pointer: '/values' });
  });

  it('the database itself refuses a back-dated set', async () => {
    await expect(db.query(`INSERT INTO threshold_set (effective_from, "values") VALUES (now() - interval '1 day', '{}')`)).rejects.toThrow(/threshold_set_not_backdated/);
  });

  it('lists every cut-off with its published source, the value in force and its allowed range', async () => {
    const res = await api().get('/api/admin/thresholds').set('Cookie', admin).expect(200);
    expect(res.body.rows).toHaveLength(Object.keys(defaultThresholds).length);
    const cfr = res.body.rows.find((r: { key: string }) => r.key === 'cfr');
    expect(cfr).toMatchObject({ label: 'CFR cut-off', range: { min: 2, max: 2.5 } });
    expect(cfr.defaultSource).toMatch(/EAPCI 2020/);
    // Every published default lies inside its own allowed range.
    for (const r of res.body.rows) {
      expect(r.defaultValue, r.key).toBeGreaterThanOrEqual(r.range.min);
      expect(r.defaultValue, r.key).toBeLessThanOrEqual(r.range.max);
    }
  });
});

describe('thresholds: permissions', () => {
  it.each([
    ['post', '/api/admin/thresholds', { values: { cfr: 2.3 } }],
    ['put', '/api/admin/lab-settings', { version: 1, settings: { timeZone: 'UTC', signatureTargetHours: 24, ehrBaseUrl: null, mailFrom: null } }],
    ['post', '/api/admin/report-templates/active', { version: 'v2' }],
  ] as const)('only the admin may %s %s', async (method, path, body) => {
    for (const cookie of [chief, physician, staff]) await send(method, path, cookie).send(body).expect(403);
    await api()[method](path).set('Origin', stack.url).send(body).expect(401);
    expect(await db.query(`SELECT count(*)::int AS n FROM audit_event WHERE entity_type = 'settings' AND actor_role <> 'admin'`)).toEqual([{ n: 0 }]);
  });
});

describe('thresholds: effective date, signed reports and addenda', () => {
  let before1: { studyId: string; versionId: string };
  let before2: { studyId: string };
  let changeSetId: number;

  it('a change applies to studies signed from its effective date; a report signed before keeps its cut-off and interpretation', async () => {
    // Two studies signed under the published CFR cut-off (< 2.0, EAPCI 2020): CFR 2.20 is normal.
    const a = await readyStudy();
    const signedA = await sign(a.id);
    expect(signedA.status).toBe(201);
    const b = await readyStudy();
    expect((await sign(b.id)).status).toBe(201);
    before1 = { studyId: a.id, versionId: signedA.body.id };
    before2 = { studyId: b.id };
    const oldRow = await versionRow(signedA.body.id);
    expect(oldRow.thresholds.cfr).toBe(2.0);
    expect(cfrOf(oldRow).cfr).toBeCloseTo(2.2, 10);
    expect(cfrOf(oldRow).cfrFlag).toBe('normal');
    expect(oldRow.thresholds_basis).toBe('in-force');

    // The admin moves the CFR cut-off to 2.5 (ESC 2024 uses < 2.5), effective now.
    const change = await send('post', '/api/admin/thresholds', admin).send({ values: { cfr: 2.5 }, note: 'Lab follows ESC 2024' }).expect(201);
    changeSetId = change.body.set.id;
    expect(change.body.set.overrides).toEqual({ cfr: 2.5 });
    const cfrRow = change.body.overview.rows.find((r: { key: string }) => r.key === 'cfr');
    expect(cfrRow).toMatchObject({ value: 2.5, source: 'lab setting' });
    expect(change.body.overview.inForce.setId).toBe(changeSetId);
    // The live form reads the same value.
    const live = await api().get('/api/settings/thresholds').set('Cookie', staff).expect(200);
    expect(live.body.values.cfr).toBe(2.5);

    // The old report is unchanged: its stored row, its PDF bytes, its printed cut-off and flag.
    const again = await versionRow(signedA.body.id);
    expect(again.content_sha256).toBe(oldRow.content_sha256);
    expect(again.thresholds.cfr).toBe(2.0);
    expect(cfrOf(again).cfrFlag).toBe('normal');
    expect(again.narrative_text).toMatch(/CFR 2\.20: normal \(cut-off < 2\.00, EAPCI 2020\)/);
    expect(again.narrative_text).toMatch(/CFR abnormal: < 2\.00 \(EAPCI 2020\)/);
    const pdf = await api().get(`/api/reports/${signedA.body.id}/pdf`).set('Cookie', physician).buffer(true).parse((res, cb) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => cb(null, Buffer.concat(chunks)));
    }).expect(200);
    expect(pdf.headers['x-content-sha256']).toBe(oldRow.pdf_sha256);

    // A study signed now is judged by 2.5: the same CFR 2.20 is abnormal, and the cut-off is the lab's.
    const c = await readyStudy();
    const signedC = await sign(c.id);
    expect(signedC.status).toBe(201);
    const newRow = await versionRow(signedC.body.id);
    expect(newRow.thresholds.cfr).toBe(2.5);
    expect(newRow.threshold_set_id).toBe(changeSetId);
    expect(cfrOf(newRow).cfrFlag).toBe('abnormal');
    expect(newRow.narrative_text).toMatch(/CFR 2\.20: abnormal \(cut-off < 2\.50, lab setting\)/);
    expect(newRow.narrative_text).toMatch(/CFR abnormal: < 2\.50 \(lab setting\)/);
  }, 180_000);

  it('records the change in the audit trail with every value before and after', async () => {
    const row = await lastSettingsAudit('thresholds');
    expect(row).toMatchObject({ action: 'create', actor_role: 'admin', outcome: 'success' });
    expect(row.detail).toMatchObject({ setting: 'thresholds', thresholdSetId: changeSetId, changed: { cfr: { before: 2, after: 2.5 } }, note: 'Lab follows ESC 2024' });
    expect(row.detail.before.cfr).toBe(2);
    expect(row.detail.after.cfr).toBe(2.5);
    expect(Object.keys(row.detail.after)).toHaveLength(Object.keys(defaultThresholds).length);
    // The trail lists it for the admin.
    const trail = await api().get('/api/audit-trail').query({ action: 'create' }).set('Cookie', admin).expect(200);
    expect(trail.body.items.some((i: { id: string }) => i.id === String(row.id))).toBe(true);
  });

  it('an addendum keeps the original report\'s thresholds by default, and the choice is recorded', async () => {
    const open = await send('post', `/api/studies/${before1.studyId}/transitions`, physician).send({ action: 'open-addendum', version: (await api().get(`/api/studies/${before1.studyId}/report`).set('Cookie', physician)).body.studyVersion }).expect(200);
    expect(open.body.state).toBe('amending');
    const preview = await api().get(`/api/studies/${before1.studyId}/report`).set('Cookie', physician).expect(200);
    expect(preview.body.thresholds).toMatchObject({ basis: 'original', amendedVersion: 1, choice: { chosen: 'original', differences: [{ key: 'cfr', original: 2, current: 2.5 }] } });
    const signed = await sign(before1.studyId, { reason: 'Plan clarified' });
    expect(signed.status).toBe(201);
    const row = await versionRow(signed.body.id);
    expect(row.version_no).toBe(2);
    expect(row.thresholds_basis).toBe('original');
    expect(row.thresholds.cfr).toBe(2.0);
    expect(cfrOf(row).cfrFlag).toBe('normal');
    const [audit] = await db.query(`SELECT detail FROM audit_event WHERE action = 'sign-addendum' AND entity_id = $1 ORDER BY id DESC LIMIT 1`, [before1.studyId]);
    expect(audit.detail.thresholds).toMatchObject({ basis: 'original', choice: 'original' });
  });

  it('an addendum applies the thresholds now in force when the physician chooses them, and the choice is recorded', async () => {
    const version = (await api().get(`/api/studies/${before2.studyId}/report`).set('Cookie', physician)).body.studyVersion;
    await send('post', `/api/studies/${before2.studyId}/transitions`, physician).send({ action: 'open-addendum', version }).expect(200);
    const preview = await api().get(`/api/studies/${before2.studyId}/report`).query({ thresholds: 'current' }).set('Cookie', physician).expect(200);
    expect(preview.body.thresholds).toMatchObject({ basis: 'current', choice: { chosen: 'current' } });
    expect(preview.body.text).toMatch(/CFR 2\.20: abnormal \(cut-off < 2\.50, lab setting\)/);
    await api().get(`/api/studies/${before2.studyId}/report`).query({ thresholds: 'newest' }).set('Cookie', physician).expect(400);
    const bad = await sign(before2.studyId, { reason: 'Lab cut-off applied', thresholds: 'latest' });
    expect(bad.status).toBe(400);
    expect(bad.body.errors[0].pointer).toBe('/thresholds');
    const signed = await sign(before2.studyId, { reason: 'Lab cut-off applied', thresholds: 'current' });
    expect(signed.status).toBe(201);
    const row = await versionRow(signed.body.id);
    expect(row.thresholds_basis).toBe('current');
    expect(row.thresholds.cfr).toBe(2.5);
    expect(row.threshold_set_id).toBe(changeSetId);
    expect(cfrOf(row).cfrFlag).toBe('abnormal');
    const [audit] = await db.query(`SELECT detail FROM audit_event WHERE action = 'sign-addendum' AND entity_id = $1 ORDER BY id DESC LIMIT 1`, [before2.studyId]);
    expect(audit.detail.thresholds).toMatchObject({ basis: 'current', choice: 'current', thresholdSetId: changeSetId });
  });

  it('a first signature cannot ask for an earlier version\'s thresholds', async () => {
    const s = await readyStudy();
    const res = await sign(s.id, { thresholds: 'original' });
    expect(res.status).toBe(400);
    expect(res.body.errors[0].pointer).toBe('/thresholds');
  });

  it('a set scheduled for a later date does not judge studies signed before it', async () => {
    const later = new Date(Date.now() + 200 * 86_400_000).toISOString().slice(0, 10);
    const res = await send('post', '/api/admin/thresholds', admin).send({ values: { imr: 30 }, effectiveFrom: later }).expect(201);
    expect(res.body.overview.scheduled.map((s: { id: number }) => s.id)).toContain(res.body.set.id);
    // The scheduled set builds on the value in force then (CFR 2.5) and changes only IMR.
    expect(res.body.set.overrides).toEqual({ cfr: 2.5, imr: 30 });
    expect((await thresholdsInForce(db)).values.imr).toBe(25);
    expect((await thresholdsInForce(db, new Date(Date.now() + 201 * 86_400_000))).values.imr).toBe(30);
  });
});

describe('thresholds: a date\'s first instant in the lab\'s time zone', () => {
  it('takes effect at the first of two midnights when the clock falls back at midnight', async () => {
    // Cuba leaves summer time on the first Sunday of November at 01:00 summer time back to 00:00, so
    // that day's midnight happens twice (IANA time zone database, northamerica, Rule Cuba [memory]).
    // The next such day within the year a set may be scheduled, found by the database's zone rules:
    // one whose midnight, an hour earlier, is still that day's midnight.
    const [found] = await db.query(
      `SELECT d::date::text AS day, (d::timestamp AT TIME ZONE 'America/Havana') AS later
         FROM generate_series(((now() AT TIME ZONE 'America/Havana')::date + 1)::timestamp, ((now() AT TIME ZONE 'America/Havana')::date + 365)::timestamp, interval '1 day') d
        WHERE ((d::timestamp AT TIME ZONE 'America/Havana') - interval '1 hour') AT TIME ZONE 'America/Havana' = d::timestamp
        LIMIT 1`,
    );
    expect(found, 'a day within 365 days whose midnight happens twice in Havana').toBeTruthy();
    const first = new Date(found.later.getTime() - 3_600_000);
    const [before] = await db.query(`SELECT time_zone FROM lab_settings WHERE id = 1`);
    await db.query(`UPDATE lab_settings SET time_zone = 'America/Havana' WHERE id = 1`);
    try {
      const imr = (await thresholdsInForce(db, found.later)).values.imr === 35 ? 36 : 35;
      const res = await send('post', '/api/admin/thresholds', admin).send({ values: { imr }, effectiveFrom: found.day }).expect(201);
      expect(res.body.set.effectiveFrom).toBe(first.toISOString());
      expect((await thresholdsInForce(db, first)).values.imr).toBe(imr);
      expect((await thresholdsInForce(db, new Date(first.getTime() - 1))).values.imr).not.toBe(imr);
    } finally {
      await db.query(`UPDATE lab_settings SET time_zone = $1 WHERE id = 1`, [before.time_zone]);
    }
  });
});

describe('lab settings', () => {
  it('checks each field and names it', async () => {
    const view = await api().get('/api/admin/lab-settings').set('Cookie', admin).expect(200);
    const res = await send('put', '/api/admin/lab-settings', admin)
      .send({ version: view.body.version, settings: { timeZone: 'Mars/Olympus', signatureTargetHours: 0, ehrBaseUrl: 'ftp://ehr', mailFrom: 'not an address' } })
      .expect(400);
    const pointers = res.body.errors.map((e: { pointer: string }) => e.pointer).sort();
    expect(pointers).toEqual(['/settings/ehrBaseUrl', '/settings/mailFrom', '/settings/signatureTargetHours', '/settings/timeZone']);
    expect(res.body.errors.find((e: { pointer: string }) => e.pointer === '/settings/timeZone').detail).toMatch(/IANA time zone/);
  });

  it('saves them with before and after in the audit trail; labSettings() applies them and a stale version is refused', async () => {
    const view = await api().get('/api/admin/lab-settings').set('Cookie', admin).expect(200);
    expect(view.body.effective.ehrBaseUrl).toBe(stack.config.ehr.fhirBaseUrl);
    const settings = { timeZone: 'Europe/Oslo', signatureTargetHours: 12, ehrBaseUrl: 'https://ehr.hospital.example/fhir', mailFrom: 'Cath lab <cathlab@hospital.example>' };
    const saved = await send('put', '/api/admin/lab-settings', admin).send({ version: view.body.version, settings }).expect(200);
    expect(saved.body.effective).toMatchObject(settings);
    expect(saved.body.version).toBe(view.body.version + 1);
    expect(await labSettings(db, defaultsFrom(stack.config))).toMatchObject({ ...settings, templateVersion: expect.stringMatching(/^v\d+$/) });
    const row = await lastSettingsAudit('lab-settings');
    expect(row).toMatchObject({ action: 'update', actor_role: 'admin' });
    expect(row.detail.before).toMatchObject({ timeZone: view.body.stored.timeZone, signatureTargetHours: view.body.stored.signatureTargetHours, ehrBaseUrl: null });
    expect(row.detail.after).toEqual(settings);
    expect(row.detail.changed.signatureTargetHours).toEqual({ before: view.body.stored.signatureTargetHours, after: 12 });
    const stale = await send('put', '/api/admin/lab-settings', admin).send({ version: view.body.version, settings: { ...settings, signatureTargetHours: 8 } }).expect(409);
    expect(stale.body.current.stored.signatureTargetHours).toBe(12);
    // Cleared: the server's configuration applies again.
    await send('put', '/api/admin/lab-settings', admin).send({ version: saved.body.version, settings: { ...settings, ehrBaseUrl: null, mailFrom: null } }).expect(200);
    expect((await labSettings(db, { ehrBaseUrl: 'http://configured/fhir', mailFrom: 'configured@localhost' })).ehrBaseUrl).toBe('http://configured/fhir');
  });

  it('works on the defaults when the settings row is missing (a restored database), and saving writes the row again at version 2', async () => {
    const [kept] = await db.query(`SELECT * FROM lab_settings WHERE id = 1`);
    await db.query(`DELETE FROM lab_settings WHERE id = 1`);
    try {
      const view = await api().get('/api/admin/lab-settings').set('Cookie', admin).expect(200);
      expect(view.body).toMatchObject({ version: 1, updatedAt: null, updatedBy: null, stored: { timeZone: 'UTC', signatureTargetHours: 24, ehrBaseUrl: null, mailFrom: null } });
      const settings = { timeZone: 'Europe/Oslo', signatureTargetHours: 12.5, ehrBaseUrl: null, mailFrom: null };
      const saved = await send('put', '/api/admin/lab-settings', admin).send({ version: 1, settings }).expect(200);
      expect(saved.body).toMatchObject({ version: 2, stored: settings });
      const [row] = await db.query(`SELECT time_zone, signature_target_hours::text AS hours, template_version, version, updated_at, updated_by FROM lab_settings WHERE id = 1`);
      // The columns the save does not name keep their defaults (migration LabSettings1765420000000).
      expect(row).toMatchObject({ time_zone: 'Europe/Oslo', hours: '12.5', template_version: 'v1', version: 2 });
      expect(row.updated_at).toBeInstanceOf(Date);
      expect(row.updated_by).not.toBeNull();
      const again = await send('put', '/api/admin/lab-settings', admin).send({ version: 2, settings: { ...settings, signatureTargetHours: 24 } }).expect(200);
      expect(again.body.version).toBe(3);
    } finally {
      await db.query(`DELETE FROM lab_settings WHERE id = 1`);
      await db.query(
        `INSERT INTO lab_settings (id, time_zone, signature_target_hours, ehr_base_url, mail_from, template_version, version, updated_at, updated_by)
         VALUES (1, $1, $2, $3, $4, $5, $6, $7, $8)`,
        [kept.time_zone, kept.signature_target_hours, kept.ehr_base_url, kept.mail_from, kept.template_version, kept.version, kept.updated_at, kept.updated_by],
      );
    }
  });

  it('refuses an EHR endpoint on a host the configuration does not list (no delivery to another server, no probing inside)', async () => {
    const view = await api().get('/api/admin/lab-settings').set('Cookie', admin).expect(200);
    for (const ehrBaseUrl of ['https://attacker.example/fhir', 'http://169.254.169.254/latest', 'http://127.0.0.1:5432/x']) {
      const res = await send('put', '/api/admin/lab-settings', admin).send({ version: view.body.version, settings: { ...view.body.stored, templateVersion: undefined, ehrBaseUrl } });
      expect({ ehrBaseUrl, status: res.status }).toEqual({ ehrBaseUrl, status: 400 });
      expect(res.body.errors.map((e: { pointer: string }) => e.pointer)).toEqual(['/settings/ehrBaseUrl']);
    }
    const after = await api().get('/api/admin/lab-settings').set('Cookie', admin).expect(200);
    expect(after.body.version).toBe(view.body.version);
  });

  it('deliveries go to the lab\'s EHR endpoint and notices come from the lab\'s sender, read when they are sent', async () => {
    const view = await api().get('/api/admin/lab-settings').set('Cookie', admin).expect(200);
    const settings = { ...view.body.stored, ehrBaseUrl: 'http://127.0.0.1:9/lab-ehr/fhir', mailFrom: 'Cath lab <cathlab@hospital.example>' };
    delete settings.templateVersion;
    await send('put', '/api/admin/lab-settings', admin).send({ version: view.body.version, settings }).expect(200);
    const s = await readyStudy();
    const signed = await sign(s.id);
    expect(signed.status).toBe(201);

    const urls: Array<string | undefined> = [];
    const tasks = createDeliveryTasks(db, {
      send: async (_bundle, url) => {
        urls.push(url);
        return { ok: false, kind: 'rejected', status: 400, message: 'test endpoint' };
      },
      limitMs: 86_400_000,
      leaseMs: 60_000,
      identifierSystems: stack.config.ehr.identifierSystems,
      settingsDefaults: defaultsFrom(stack.config),
    });
    await runOnce({ connectionString: process.env.DATABASE_URL!, taskList: tasks, logger: new Logger(() => () => undefined) });
    expect(urls).toContain('http://127.0.0.1:9/lab-ehr/fhir');

    const port = await new Promise<number>((resolve) => {
      const srv = createServer().listen(0, '127.0.0.1', () => {
        const p = (srv.address() as { port: number }).port;
        srv.close(() => resolve(p));
      });
    });
    const smtp = await startFakeSmtp({ port, httpPort: 0 });
    try {
      const task = sendReportNoticeTask(db, { host: '127.0.0.1', port, from: 'Configured <configured@localhost>', hospitalName: 'Test hospital' });
      await task({ reportVersionId: signed.body.id }, {} as never);
      expect(smtp.caught.at(-1)?.from).toBe('cathlab@hospital.example');
      expect(smtp.caught.at(-1)?.raw).toMatch(/^From: Cath lab <cathlab@hospital\.example>/m);
    } finally {
      await smtp.close();
    }
  }, 120_000);
});

describe('report templates', () => {
  it('lists the shipped versions, shows one, refuses an unknown one', async () => {
    const list = await api().get('/api/admin/report-templates').set('Cookie', admin).expect(200);
    expect(list.body.versions.map((v: { version: string }) => v.version)).toEqual(expect.arrayContaining(['v1', 'v2']));
    expect(list.body.active).toBe('v1');
    const v2 = await api().get('/api/admin/report-templates/v2').set('Cookie', admin).expect(200);
    expect(v2.body.sources[0]).toMatchObject({ medium: 'html', name: 'report.hbs' });
    expect(v2.body.sources.find((f: { medium: string; name: string }) => f.medium === 'text' && f.name === 'thresholds.hbs').text).toMatch(/thresholdsBasis/);
    await api().get('/api/admin/report-templates/v99').set('Cookie', admin).expect(404);
    await send('post', '/api/admin/report-templates/active', admin).send({ version: 'v99' }).expect(404);
    const bad = await send('post', '/api/admin/report-templates/active', admin).send({ version: '../v1' }).expect(400);
    expect(bad.body.errors[0].pointer).toBe('/version');
  });

  it('activating a version applies it to new signatures (audited); a signed version keeps its own', async () => {
    const first = await readyStudy();
    const signedV1 = await sign(first.id);
    expect((await versionRow(signedV1.body.id)).template_version).toBe('v1');
    const res = await send('post', '/api/admin/report-templates/active', admin).send({ version: 'v2' }).expect(200);
    expect(res.body.active).toBe('v2');
    const audit = await lastSettingsAudit('report-template');
    expect(audit.detail).toMatchObject({ before: { templateVersion: 'v1' }, after: { templateVersion: 'v2' } });

    const second = await readyStudy();
    const signedV2 = await sign(second.id);
    const row = await versionRow(signedV2.body.id);
    expect(row.template_version).toBe('v2');
    expect(row.narrative_text).toMatch(/Judged by the lab's thresholds in force from /);
    const old = await versionRow(signedV1.body.id);
    expect(old.template_version).toBe('v1');
    expect(old.narrative_text).not.toMatch(/Judged by/);
  });
});

describe('reading the settings', () => {
  it('is audited too: who looked at which settings, and when', async () => {
    const before = Number((await db.query(`SELECT max(id) AS id FROM audit_event`))[0].id);
    await api().get('/api/admin/role-mapping').set('Cookie', admin).expect(200);
    await api().get('/api/admin/thresholds').set('Cookie', admin).expect(200);
    await api().get('/api/admin/lab-settings').set('Cookie', admin).expect(200);
    await api().get('/api/admin/report-templates').set('Cookie', admin).expect(200);
    await api().get('/api/admin/report-templates/v2').set('Cookie', admin).expect(200);
    const rows = await db.query(`SELECT action, entity_type, entity_id, actor_role, detail FROM audit_event WHERE id > $1 ORDER BY id`, [before]);
    expect(rows.map((r: { entity_id: string }) => r.entity_id)).toEqual(['role-mapping', 'thresholds', 'lab-settings', 'report-templates', 'report-template']);
    for (const r of rows) expect(r).toMatchObject({ action: 'read', entity_type: 'settings', actor_role: 'admin' });
    expect(rows[4].detail).toEqual({ version: 'v2' });
  });
});

describe('role mapping', () => {
  it('shows the claim and the group → role table in force to the admin only', async () => {
    const res = await api().get('/api/admin/role-mapping').set('Cookie', admin).expect(200);
    expect(res.body.claim).toBe(stack.config.oidc.roleClaim);
    expect(res.body.rules).toEqual(Object.entries(stack.config.oidc.roleMap).map(([group, role]) => expect.objectContaining({ group, role })));
    await api().get('/api/admin/role-mapping').set('Cookie', chief).expect(403);
  });
});
