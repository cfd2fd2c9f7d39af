import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import type { AuditEvent, Bundle } from 'fhir/r4';
import { recordAudit } from '../../server/audit/audit';
import { toFhirAuditEvent } from '../../fhir/audit-event';
import { openOwnerDatabase, openTestDatabase } from '../support/app';
import { fhirIssues } from '../support/fhir-validator';
import { createStudy } from '../support/factories';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

let db: DataSource;
let stack: TestStack;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
});
afterAll(async () => {
  await stack.close();
  await db.destroy();
});

describe('the audit trail is append-only in the database itself', () => {
  it.each([
    ['UPDATE', `UPDATE audit_event SET outcome = 'success'`],
    ['DELETE', `DELETE FROM audit_event`],
    ['TRUNCATE', `TRUNCATE audit_event`],
  ])('refuses %s', async (op, sql) => {
    // Even the owner role, which has every privilege on the table, meets the trigger (the server's
    // role lacks the privileges altogether: least-privilege.test.ts).
    const owner = await openOwnerDatabase();
    try {
      await recordAudit(db, { action: 'read', outcome: 'success', entityType: 'study', entityId: 'x' });
      const before = (await db.query(`SELECT count(*)::int AS n FROM audit_event`))[0].n;
      await expect(owner.query(sql)).rejects.toThrow(new RegExp(`audit_event is append-only: ${op} refused`));
      expect((await db.query(`SELECT count(*)::int AS n FROM audit_event`))[0].n).toBe(before);
    } finally {
      await owner.destroy();
    }
  });
});

describe('what is audited', () => {
  it('records a read of a study with who, role, what, when, from where and the outcome', async () => {
    const study = await createStudy(db);
    const session = await signIn(stack, usernameOf('physician'));
    const res = await request(stack.url).get(`/api/studies/${study.id}`).set('Cookie', session.cookie).expect(200);
    expect(res.body).toMatchObject({ accession: study.accession, patient: { mrn: study.patient.mrn } });
    const [row] = await db.query(`SELECT * FROM audit_event WHERE action = 'read' AND entity_id = $1`, [study.id]);
    expect(row).toMatchObject({ actor_role: 'physician', actor_name: 'Dr. Kofi Oduya', entity_type: 'study', outcome: 'success', client_address: '127.0.0.1' });
    expect(row.recorded_at).toBeInstanceOf(Date);
    expect(row.actor_user_id).toMatch(/^[0-9a-f-]{36}$/);
  });

  it('records a worklist search', async () => {
    const session = await signIn(stack, usernameOf('staff'));
    await request(stack.url).get('/api/studies').set('Cookie', session.cookie).expect(200);
    const [row] = await db.query(`SELECT * FROM audit_event WHERE action = 'search' ORDER BY id DESC LIMIT 1`);
    expect(row).toMatchObject({ actor_role: 'staff', entity_type: 'study', outcome: 'success' });
  });
});

describe('export as FHIR R4 AuditEvent', () => {
  const base = {
    id: '42',
    recordedAt: new Date('2026-11-30T08:15:00Z'),
    actorUserId: '7f1c2a9e-4b1d-4c55-9a57-0e0f7b8f3a10',
    actorName: 'Ines Varga, RN',
    actorRole: 'staff',
    entityType: 'study',
    entityId: '0b6d1c70-52c4-4f0e-8a43-5d8e1d7c9b21',
    clientAddress: '127.0.0.1',
  };

  // Event type codes: DICOM PS3.16 CID 400 (110110 Patient Record, 110114 User Authentication,
  // 110113 Security Alert); action codes C/R/U/D/E and outcome 0/4 from the FHIR R4 AuditEvent value sets.
  it.each([
    ['read', 'success', '110110', 'R', '0'],
    ['update', 'success', '110110', 'U', '0'],
    ['create', 'success', '110110', 'C', '0'],
    ['sign-in', 'success', '110114', 'E', '0'],
    ['sign-in-failed', 'failure', '110114', 'E', '4'],
    ['access-denied', 'denied', '110113', 'E', '4'],
  ] as const)('maps %s/%s to type %s, action %s, outcome %s and validates against FHIR R4', (action, outcome, type, code, out) => {
    const event = toFhirAuditEvent({ ...base, action, outcome });
    expect(event.type).toMatchObject({ system: 'http://dicom.nema.org/resources/ontology/DCM', code: type });
    expect(event.action).toBe(code);
    expect(event.outcome).toBe(out);
    expect(event.recorded).toBe('2026-11-30T08:15:00.000Z');
    expect(event.agent[0]).toMatchObject({ requestor: true, who: { display: 'Ines Varga, RN' }, network: { address: '127.0.0.1', type: '2' } });
    expect(fhirIssues(event)).toEqual([]);
  });

  it('is caught by the validator when a required element is missing (the check can fail)', () => {
    const event = toFhirAuditEvent({ ...base, action: 'read', outcome: 'success' });
    const broken = { ...event, agent: undefined } as unknown as AuditEvent;
    expect(fhirIssues(broken).join('\n')).toMatch(/agent/i);
  });

  it('serves the trail to the chief as a Bundle of valid AuditEvents', async () => {
    // The validations above block the event loop for seconds: let the server close the keep-alive
    // connections that timed out meanwhile before the client reuses one.
    await new Promise((resolve) => setTimeout(resolve, 200));
    const session = await signIn(stack, usernameOf('chief'));
    const res = await request(stack.url).get('/api/audit-events?limit=20').set('Cookie', session.cookie).expect(200);
    const bundle = res.body as Bundle;
    expect(bundle.resourceType).toBe('Bundle');
    expect(bundle.entry!.length).toBeGreaterThan(0);
    expect(bundle.entry!.some((e) => (e.resource as AuditEvent).subtype?.[0].code === '110122')).toBe(true);
    expect(fhirIssues(bundle)).toEqual([]);
  });
});

describe('the audit trail for people (GET /api/audit-trail)', () => {
  it('lists newest first across more than 999 events, pages by an opaque cursor, and names the patient and accession', async () => {
    // Enough events that ids cross 999 → 1000: compared as text, "999" would sort above "1000".
    const { n } = (await db.query(`SELECT count(*)::int AS n FROM audit_event`))[0];
    if (n < 1100) await db.query(`INSERT INTO audit_event (action, outcome, entity_type) SELECT 'search', 'success', 'study' FROM generate_series(1, $1)`, [1100 - n]);
    const study = await createStudy(db);
    const session = await signIn(stack, usernameOf('physician'));
    await request(stack.url).get(`/api/studies/${study.id}`).set('Cookie', session.cookie).expect(200);
    const chief = await signIn(stack, usernameOf('chief'));

    const first = await request(stack.url).get('/api/audit-trail?limit=20').set('Cookie', chief.cookie).expect(200);
    // The same order straight from the table: recorded_at, then id, both descending (ids compared as
    // numbers), leaving out the record of this very search, written after the page was read.
    const [{ own }] = await db.query(`SELECT max(id) AS own FROM audit_event WHERE entity_type = 'audit-event'`);
    const newest: { id: string }[] = await db.query(`SELECT a.id::text AS id FROM audit_event a WHERE a.id < $1 ORDER BY a.recorded_at DESC, a.id DESC LIMIT 40`, [own]);
    const expected = newest.map((r) => r.id);
    const start = 0;
    expect(first.body.items.map((i: { id: string }) => i.id)).toEqual(expected.slice(start, start + 20));
    expect(first.body.nextCursor).toMatch(/^[A-Za-z0-9_-]+$/);
    const next = await request(stack.url).get('/api/audit-trail').query({ limit: 20, cursor: first.body.nextCursor }).set('Cookie', chief.cookie).expect(200);
    expect(next.body.items.map((i: { id: string }) => i.id)).toEqual(expected.slice(start + 20, start + 40));

    const read = first.body.items.find((i: { action: string; studyId: string }) => i.action === 'read' && i.studyId === study.id);
    expect(read).toMatchObject({ actionLabel: 'Opened', actor: 'Dr. Kofi Oduya', target: `Testperson, Ada · MRN ${study.patient.mrn} · ${study.accession}` });
  });

  it('filters by user, patient (MRN in any case), action and date', async () => {
    const study = await createStudy(db);
    const staff = await signIn(stack, usernameOf('staff'));
    await request(stack.url).get(`/api/studies/${study.id}`).set('Cookie', staff.cookie).expect(200);
    const chief = await signIn(stack, usernameOf('chief'));
    const today = new Date().toISOString().slice(0, 10);
    const q = new URLSearchParams({ patient: study.patient.mrn.toLowerCase(), action: 'read', from: today, to: today });
    const res = await request(stack.url).get(`/api/audit-trail?${q}`).set('Cookie', chief.cookie).expect(200);
    expect(res.body.items.length).toBe(1);
    expect(res.body.items[0]).toMatchObject({ action: 'read', studyId: study.id, actorRole: 'staff' });
    const byUser = await request(stack.url).get(`/api/audit-trail?patient=${study.patient.mrn}&user=oduya`).set('Cookie', chief.cookie).expect(200);
    expect(byUser.body.items).toEqual([]);
    const yesterday = new Date(Date.now() - 86_400_000).toISOString().slice(0, 10);
    const before = await request(stack.url).get(`/api/audit-trail?patient=${study.patient.mrn}&to=${yesterday}`).set('Cookie', chief.cookie).expect(200);
    expect(before.body.items).toEqual([]);
    await request(stack.url).get('/api/audit-trail?action=launch').set('Cookie', chief.cookie).expect(400);
  });
});
