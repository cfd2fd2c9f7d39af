import { createHash, randomUUID } from 'node:crypto';
import request from 'supertest';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import type { AuditEvent, Bundle } from 'fhir/r4';
import { openOwnerDatabase, openTestDatabase } from '../support/app';
import { createPatient, createStudy } from '../support/factories';
import { fhirIssues } from '../support/fhir-validator';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';
import { roles } from '../../shared/auth/permissions';
import type { AuditTrailItem, AuditTrailPage } from '../../shared/audit/trail';

let db: DataSource;
let owner: DataSource;
let stack: TestStack;
let chief: string;

beforeAll(async () => {
  db = await openTestDatabase();
  owner = await openOwnerDatabase();
  stack = await startStack(db);
  chief = (await signIn(stack, usernameOf('chief'))).cookie;
});
afterAll(async () => {
  await stack.close();
  await owner.destroy();
  await db.destroy();
});

/** Audit rows written as the owner, who may set recorded_at (the server's role may not: least-privilege.test.ts). */
async function insertEvents(rows: { at: string; action?: string; entityType?: string | null; entityId?: string | null; actorName?: string | null; actorUserId?: string | null; outcome?: string; detail?: object | null }[]): Promise<string[]> {
  const ids: string[] = [];
  for (const r of rows) {
    const [row] = await owner.query(
      `INSERT INTO audit_event (recorded_at, action, entity_type, entity_id, actor_name, actor_user_id, actor_role, outcome, detail, client_address)
       VALUES ($1, $2, $3, $4, $5, $6, 'staff', $7, $8, '127.0.0.1') RETURNING id::text AS id`,
      [r.at, r.action ?? 'read', r.entityType === undefined ? 'study' : r.entityType, r.entityId ?? null, r.actorName ?? 'Ines Varga, RN', r.actorUserId ?? null, r.outcome ?? 'success', r.detail ? JSON.stringify(r.detail) : null],
    );
    ids.push(row.id);
  }
  return ids;
}

const trail = async (query: Record<string, string>, cookie = chief): Promise<AuditTrailPage> =>
  (await request(stack.url).get('/api/audit-trail').query(query).set('Cookie', cookie).expect(200)).body;

/** Follows nextCursor to the end, calling `between` before each further page. */
async function allPages(query: Record<string, string>, between: () => Promise<void> = async () => {}): Promise<AuditTrailItem[]> {
  const items: AuditTrailItem[] = [];
  let page = await trail(query);
  items.push(...page.items);
  for (let guard = 0; page.nextCursor && guard < 100; guard++) {
    await between();
    page = await trail({ ...query, cursor: page.nextCursor });
    items.push(...page.items);
  }
  return items;
}

describe('keyset paging over (recorded_at, id)', () => {
  it('returns every event once, newest first, ties broken by id, while new events arrive between pages', async () => {
    const studyId = randomUUID();
    // Twelve events, three of them at the very same instant (a page boundary falls among them).
    const times = ['2021-03-01T10:00:00.000001Z', '2021-03-01T10:00:00.000002Z', '2021-03-01T09:00:00Z', '2021-03-01T09:00:00Z', '2021-03-01T09:00:00Z', '2021-02-28T23:59:59.999999Z', '2021-02-01T08:00:00Z', '2021-01-01T00:00:00Z', '2020-12-31T23:59:59Z', '2020-06-01T12:00:00Z', '2020-06-01T12:00:00.5Z', '2019-01-01T00:00:00Z'];
    const ids = await insertEvents(times.map((at) => ({ at, entityId: studyId })));
    // Newest first; the three at 09:00 by id, highest first; microseconds count.
    const expected = [1, 0, 4, 3, 2, 5, 6, 7, 8, 10, 9, 11].map((i) => ids[i]);

    let added = 0;
    const seen = await allPages({ study: studyId, limit: '4' }, async () => {
      // Events written while paging sort above page one: none may repeat or shift a page.
      await insertEvents([{ at: new Date().toISOString(), entityId: studyId }]);
      added++;
    });
    expect(added).toBe(2);
    expect(seen.map((e) => e.id)).toEqual(expected);
    expect(new Set(seen.map((e) => e.id)).size).toBe(seen.length);
    // The events added meanwhile are there on a fresh first page.
    expect((await trail({ study: studyId, limit: '4' })).items.slice(0, 2).every((e) => !ids.includes(e.id))).toBe(true);
  });

  it('refuses a cursor it did not issue with 400, never 500', async () => {
    const bad = [
      'not-a-cursor',
      Buffer.from('["2031-02-30 10:00:00+00","12"]').toString('base64url'), // 30 February
      Buffer.from('["2031-01-01 25:00:00+00","12"]').toString('base64url'),
      Buffer.from('["2031-01-01 10:00:00+00","-1"]').toString('base64url'),
      Buffer.from('["2031-01-01 10:00:00+00"]').toString('base64url'),
      Buffer.from('{"at":"x"}').toString('base64url'),
      'x'.repeat(201),
    ];
    for (const cursor of bad) {
      const res = await request(stack.url).get('/api/audit-trail').query({ cursor }).set('Cookie', chief).expect(400);
      expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
      expect(JSON.stringify(res.body.errors)).toMatch(/cursor/);
    }
    await request(stack.url).get('/api/audit-trail/export').query({ cursor: 'not-a-cursor' }).set('Cookie', chief).expect(400);
  });

  it('refuses a bad range, date, action, outcome, limit or format with 400 and the field', async () => {
    const cases: [Record<string, string>, string][] = [
      [{ from: '2031-03-02', to: '2031-03-01' }, '/to'],
      [{ from: '2031-03-01T10:00:00+01:00', to: '2031-03-01T08:00:00Z' }, '/to'],
      [{ from: '2031-02-30' }, '/from'],
      [{ to: 'yesterday' }, '/to'],
      [{ action: 'launch' }, '/action'],
      [{ outcome: 'maybe' }, '/outcome'],
      [{ limit: '0' }, '/limit'],
      [{ limit: '201' }, '/limit'],
      [{ user: 'x'.repeat(101) }, '/user'],
    ];
    for (const [query, pointer] of cases) {
      const res = await request(stack.url).get('/api/audit-trail').query(query).set('Cookie', chief);
      expect(res.status, JSON.stringify(query)).toBe(400);
      expect(res.body.errors.map((e: { pointer: string }) => e.pointer), JSON.stringify(query)).toContain(pointer);
    }
    const res = await request(stack.url).get('/api/audit-trail/export').query({ format: 'xml' }).set('Cookie', chief).expect(400);
    expect(res.body.errors[0].pointer).toBe('/format');
  });
});

describe('filters', () => {
  it('by patient (MRN in any case, or family-name prefix) finds events on their studies and attachments, and nobody else’s', async () => {
    const family = `Qzv${randomUUID().slice(0, 6)}`;
    const patient = await createPatient(db, { familyName: family });
    const [s1] = await db.query(`INSERT INTO study (accession, patient_id, state) VALUES ($1, $2, 'draft') RETURNING id::text AS id`, [`ACC-${randomUUID().slice(0, 8)}`, patient.id]);
    const [s2] = await db.query(`INSERT INTO study (accession, patient_id, state) VALUES ($1, $2, 'draft') RETURNING id::text AS id`, [`ACC-${randomUUID().slice(0, 8)}`, patient.id]);
    const other = await createStudy(db);
    const mine = await insertEvents([
      { at: '2013-05-01T10:00:00Z', entityId: s1.id },
      { at: '2013-05-02T10:00:00Z', entityId: s2.id, action: 'update' },
      { at: '2013-05-03T10:00:00Z', entityType: 'attachment', entityId: randomUUID(), action: 'create', detail: { studyId: s2.id, fileName: 'trace.csv' } },
      { at: '2013-05-04T10:00:00Z', entityType: 'study-coding', entityId: s1.id, action: 'update' },
    ]);
    await insertEvents([{ at: '2013-05-02T11:00:00Z', entityId: other.id }]);

    for (const patientFilter of [patient.mrn.toLowerCase(), patient.mrn, family.slice(0, 6).toLowerCase(), family.toUpperCase()]) {
      const page = await trail({ patient: patientFilter });
      expect(page.items.map((i) => i.id), patientFilter).toEqual([...mine].reverse());
    }
    const page = await trail({ patient: patient.mrn });
    expect(page.items[0]).toMatchObject({ entityType: 'study-coding', studyId: s1.id, target: expect.stringContaining(`MRN ${patient.mrn}`) });
    expect(page.items[1]).toMatchObject({ entityType: 'attachment', studyId: s2.id });
    // Patient and action together; patient with no events; a patient nobody has.
    expect((await trail({ patient: patient.mrn, action: 'update' })).items.map((i) => i.id)).toEqual([mine[3], mine[1]]);
    expect((await trail({ patient: 'NO-SUCH-MRN-XYZ' })).items).toEqual([]);
  });

  it('by study (accession in any case, or id), user (name part, e-mail start or id), action, outcome and range', async () => {
    const study = await createStudy(db);
    const staff = await signIn(stack, usernameOf('staff'));
    const physician = await signIn(stack, usernameOf('physician'));
    await request(stack.url).get(`/api/studies/${study.id}`).set('Cookie', staff.cookie).expect(200);
    await request(stack.url).get(`/api/studies/${study.id}`).set('Cookie', physician.cookie).expect(200);

    const byAccession = await trail({ study: study.accession.toLowerCase() });
    expect(byAccession.items.map((i) => i.actorRole).sort()).toEqual(['physician', 'staff']);
    expect((await trail({ study: study.id })).items.map((i) => i.id)).toEqual(byAccession.items.map((i) => i.id));

    // The physician who read it (each test stack's identity provider is its own issuer, so the same person may have several user rows).
    const [physicianRow] = await db.query(
      `SELECT u.id::text AS id, u.email FROM audit_event a JOIN app_user u ON u.id = a.actor_user_id WHERE a.study_id = $1 AND a.actor_role = 'physician'`,
      [study.id],
    );
    for (const user of ['oduya', 'KOFI', physicianRow.email.slice(0, 4), physicianRow.id]) {
      const page = await trail({ study: study.accession, user });
      expect(page.items.map((i) => i.actor), user).toEqual(['Dr. Kofi Oduya']);
    }
    expect((await trail({ study: study.accession, user: 'nobody-by-this-name' })).items).toEqual([]);
    // A LIKE wildcard typed by the user is a character, not a wildcard.
    expect((await trail({ study: study.accession, user: '%' })).items).toEqual([]);

    const today = new Date().toISOString().slice(0, 10);
    expect((await trail({ study: study.accession, action: 'read', from: today, to: today })).items.length).toBe(2);
    expect((await trail({ study: study.accession, action: 'update' })).items).toEqual([]);
    expect((await trail({ study: study.accession, outcome: 'failure' })).items).toEqual([]);
    const hourAgo = new Date(Date.now() - 3_600_000).toISOString();
    expect((await trail({ study: study.accession, from: hourAgo })).items.length).toBe(2);
    expect((await trail({ study: study.accession, to: hourAgo })).items).toEqual([]);
  });

  it('by study finds a request to send the study\'s signed report to the EHR again', async () => {
    const study = await createStudy(db, { state: 'signed' });
    const [{ id: signer }] = await db.query(`SELECT id FROM app_user ORDER BY created_at LIMIT 1`);
    const pdf = Buffer.from('%PDF-1.7\n% invented report\n%%EOF\n');
    const [{ id: versionId }] = await db.query(
      `WITH v AS (
         INSERT INTO report_version (study_id, version_no, study_version, status, narrative_html, narrative_text, snapshot, analysis,
                                     thresholds, template_version, content_sha256, signed_by, signer_name, signed_at, attestation)
         VALUES ($1, 1, 1, 'final', '<p>Invented</p>', 'Invented', '{}', '{}', '{}', 'v1', $2, $3, 'Dr Invented', now(), 'Invented attestation') RETURNING id)
       INSERT INTO report_pdf (report_version_id, pdf, pdf_sha256) SELECT id, $4, $5 FROM v RETURNING report_version_id AS id`,
      [study.id, randomUUID().replaceAll('-', '').repeat(2), signer, pdf, createHash('sha256').update(pdf).digest('hex')],
    );
    await request(stack.url).post(`/api/report-versions/${versionId}/resend`).set('Cookie', chief).set('Origin', stack.url).expect((res) => expect(res.status).toBeLessThan(300));
    const found = await trail({ study: study.accession, action: 'update' });
    expect(found.items.map((i) => ({ entityType: i.entityType, actorRole: i.actorRole }))).toEqual([{ entityType: 'report-delivery', actorRole: 'chief' }]);
  });

  it('by date range alone: days whole (to included), instants exact (to excluded)', async () => {
    const [id1, id2, id3] = await insertEvents([
      { at: '2019-07-01T00:00:00Z', entityType: null, action: 'sign-in-failed', outcome: 'failure', actorName: null },
      { at: '2019-07-02T12:00:00Z', entityType: null, action: 'sign-in-failed', outcome: 'failure', actorName: null },
      { at: '2019-07-03T23:59:59.999Z', entityType: null, action: 'sign-in-failed', outcome: 'failure', actorName: null },
    ]);
    const [{ tz }] = await db.query(`SHOW TimeZone`);
    if (tz === 'UTC' || tz === 'Etc/UTC') expect((await trail({ from: '2019-07-01', to: '2019-07-03' })).items.map((i) => i.id)).toEqual([id3, id2, id1]);
    expect((await trail({ from: '2019-07-01T00:00:00Z', to: '2019-07-03T23:59:59.999Z' })).items.map((i) => i.id)).toEqual([id2, id1]);
    expect((await trail({ from: '2019-07-02T14:00:00+02:00', to: '2019-07-04T00:00:00Z', action: 'sign-in-failed', outcome: 'failure' })).items.map((i) => i.id)).toEqual([id3, id2]);
  });
});

describe('who may read the trail', () => {
  it('lets the chief and the admin search and export; every other role gets 403, no session 401', async () => {
    for (const role of [...roles, null]) {
      const cookie = (await signIn(stack, usernameOf(role))).cookie;
      for (const path of ['/api/audit-trail', '/api/audit-trail/export', '/api/audit-trail/export?format=fhir', '/api/audit-events']) {
        const res = await request(stack.url).get(path).set('Cookie', cookie);
        expect(res.status, `${path} as ${role}`).toBe(role === 'chief' || role === 'admin' ? 200 : 403);
      }
    }
    await request(stack.url).get('/api/audit-trail').expect(401);
    await request(stack.url).get('/api/audit-trail/export').expect(401);
  });
});

describe('reading the trail is itself audited', () => {
  const lastOwn = async () => (await db.query(`SELECT * FROM audit_event WHERE entity_type = 'audit-event' ORDER BY id DESC LIMIT 1`))[0];

  it('records a search with the filters used and what it returned', async () => {
    const admin = (await signIn(stack, usernameOf('admin'))).cookie;
    const page = await trail({ patient: 'ab-123', action: 'read', from: '2031-01-01', limit: '5' }, admin);
    const row = await lastOwn();
    expect(row).toMatchObject({ action: 'search', actor_role: 'admin', outcome: 'success', client_address: expect.stringMatching(/127\.0\.0\.1$/) });
    expect(row.detail).toEqual({ filters: { patient: 'ab-123', action: 'read', from: '2031-01-01' }, returned: page.items.length });
    // The search shows up in the trail like any other event.
    const mine = await trail({ action: 'search', limit: '1' }, admin);
    expect(mine.items[0]).toMatchObject({ actionLabel: 'Listed or searched', target: 'Audit trail', actorRole: 'admin' });
  });

  it('records the rows shown (not the one read ahead), a next page, and a search that matched nobody', async () => {
    const first = await trail({ limit: '2' });
    expect(first.items).toHaveLength(2);
    expect(first.nextCursor).toBeTruthy();
    const own = await lastOwn();
    expect(own.detail).toEqual({ filters: {}, returned: 2 });
    // The search's own row is written by the statement that reads the page: it is not on that page.
    expect(first.items.map((item) => item.id)).not.toContain(String(own.id));
    const second = await trail({ limit: '2', cursor: first.nextCursor! });
    expect((await lastOwn()).detail).toEqual({ filters: {}, returned: second.items.length, nextPage: true });
    const none = await trail({ user: `nobody-${randomUUID()}` });
    expect(none.items).toEqual([]);
    expect((await lastOwn()).detail).toMatchObject({ returned: 0 });
  });

  it('records an export with its format and filters, before the first byte is sent', async () => {
    await request(stack.url).get('/api/audit-trail/export').query({ format: 'fhir', user: 'varga', outcome: 'denied' }).set('Cookie', chief).expect(200);
    expect(await lastOwn()).toMatchObject({ action: 'export', actor_role: 'chief', detail: { format: 'fhir', filters: { user: 'varga', outcome: 'denied' } } });
    await request(stack.url).get('/api/audit-trail/export').query({ study: 'ACC-NONE' }).set('Cookie', chief).expect(200);
    expect(await lastOwn()).toMatchObject({ action: 'export', detail: { format: 'csv', filters: { study: 'ACC-NONE' } } });
  });
});

describe('CSV export', () => {
  it('streams every matching event across batches, newest first, with a header and cells a spreadsheet will not run', async () => {
    const studyId = randomUUID();
    // 2,345 events: more than two of the export's 1,000-row batches.
    await owner.query(
      `INSERT INTO audit_event (recorded_at, action, entity_type, entity_id, actor_name, actor_role, outcome)
       SELECT timestamptz '2012-01-01T00:00:00Z' + i * interval '1 second', 'read', 'study', $1, 'Reader ' || i, 'staff', 'success'
       FROM generate_series(1, 2345) i`,
      [studyId],
    );
    // A formula in a name and a reason, a comma and quotes, a line break: OWASP "CSV Injection".
    const [hostile] = await insertEvents([
      { at: '2012-06-01T00:00:00Z', entityId: studyId, actorName: '=HYPERLINK("http://x.example","click"), Esq.', outcome: 'failure', action: 'update', detail: { reason: '@SUM(A1:A9)\nsecond line' } },
    ]);
    const res = await request(stack.url).get('/api/audit-trail/export').query({ study: studyId }).set('Cookie', chief).buffer(true).expect(200);
    expect(res.headers['content-type']).toBe('text/csv; charset=utf-8');
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="?audit-trail-\d{4}-\d{2}-\d{2}\.csv"?$/);
    const rows: string[][] = parse(res.text, { relax_column_count: false });
    expect(rows[0].slice(0, 3)).toEqual(['Recorded at (UTC)', 'Event id', 'User']);
    expect(rows.length).toBe(1 + 2346);
    expect(res.text.split('\r\n').length).toBeGreaterThan(2346);
    const body = rows.slice(1);
    expect(body[0][1]).toBe(hostile);
    expect(body[0][2]).toBe(`'=HYPERLINK("http://x.example","click"), Esq.`);
    expect(body[0][15]).toBe(`{"reason":"@SUM(A1:A9)\\nsecond line"}`);
    expect(body[1][2]).toBe('Reader 2345');
    expect(body[body.length - 1][2]).toBe('Reader 1');
    expect(new Set(body.map((r) => r[1])).size).toBe(body.length);
    const times = body.map((r) => r[0]);
    expect(times).toEqual([...times].sort().reverse());
    // No cell may begin with a formula character (unless it is a plain number).
    for (const cell of body.flat()) expect(cell).not.toMatch(/^[=+@\t\r]|^-(?!\d)/);
  });
});

describe('FHIR export', () => {
  it('is a searchset Bundle of AuditEvents valid against FHIR R4, paged by _count with a next link', async () => {
    const study = await createStudy(db);
    const staff = await signIn(stack, usernameOf('staff'));
    for (let i = 0; i < 3; i++) await request(stack.url).get(`/api/studies/${study.id}`).set('Cookie', staff.cookie).expect(200);
    await insertEvents([{ at: new Date().toISOString(), entityId: study.id, action: 'update', outcome: 'failure', detail: { reason: 'stale-version' } }]);

    const first = await request(stack.url).get('/api/audit-events').query({ study: study.accession, _count: '3' }).set('Cookie', chief).expect(200);
    expect(first.headers['content-type']).toBe('application/fhir+json; charset=utf-8');
    const bundle = JSON.parse(first.text) as Bundle;
    expect(bundle).toMatchObject({ resourceType: 'Bundle', type: 'searchset' });
    // FHIR R4 Bundle and AuditEvent structure and cardinality (hl7.org/fhir/R4/auditevent.html).
    expect(fhirIssues(bundle)).toEqual([]);
    expect(bundle.entry!.length).toBe(3);
    const events = bundle.entry!.map((e) => e.resource as AuditEvent);
    expect(events[0]).toMatchObject({ action: 'U', outcome: '4', type: { code: '110110' } });
    // The patient as an entity: audit-entity-type 1 Person, object-role 1 Patient, the hospital's MRN.
    expect(events[0].entity![0]).toMatchObject({ what: { identifier: { system: stack.config.ehr.identifierSystems.patient, value: study.patient.mrn } }, role: { code: '1' }, type: { code: '1' } });
    const next = bundle.link!.find((l) => l.relation === 'next')!.url;
    const nextUrl = new URL(next);
    expect(nextUrl.pathname).toBe('/api/audit-events');
    expect(nextUrl.searchParams.get('study')).toBe(study.accession);

    const second = JSON.parse((await request(stack.url).get(`${nextUrl.pathname}${nextUrl.search}`).set('Cookie', chief).expect(200)).text) as Bundle;
    expect(fhirIssues(second)).toEqual([]);
    expect(second.entry!.length).toBe(1);
    expect(second.link!.some((l) => l.relation === 'next')).toBe(false);
    const all = [...bundle.entry!, ...second.entry!].map((e) => (e.resource as AuditEvent).id);
    expect(new Set(all).size).toBe(4);
    expect(second.entry!.map((e) => (e.resource as AuditEvent).action)).toEqual(['R']);
  });

  it('downloads as a file and is valid with no event at all (no empty entry array)', async () => {
    const res = await request(stack.url).get('/api/audit-trail/export').query({ format: 'fhir', study: 'ACC-NOTHING-HERE' }).set('Cookie', chief).expect(200);
    expect(res.headers['content-disposition']).toMatch(/filename="?audit-trail-\d{4}-\d{2}-\d{2}\.json"?$/);
    const bundle = JSON.parse(res.text) as Bundle;
    expect(bundle.entry).toBeUndefined();
    expect(fhirIssues(bundle)).toEqual([]);
    const broken = { ...bundle, type: undefined } as unknown as Bundle;
    expect(fhirIssues(broken).length).toBeGreaterThan(0);
  });
});
