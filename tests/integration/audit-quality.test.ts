import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { openTestDatabase } from '../support/app';
import { createStudy } from '../support/factories';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

// What the audit trail must be able to answer (who saw this patient, from where), and what a
// client must not be able to write into it. Common practice for health-record audit trails
// (e.g. ISO 27789 names the records disclosed by a query as part of the event).

let db: DataSource;
let stack: TestStack;
let staff: string;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
  staff = (await signIn(stack, usernameOf('staff'))).cookie;
});
afterAll(async () => {
  await stack.close();
  await db.destroy();
});

const lastAudit = async (where: string, params: unknown[] = []) =>
  (await db.query(`SELECT * FROM audit_event WHERE ${where} ORDER BY id DESC LIMIT 1`, params))[0];

describe('list reads', () => {
  it('record the ids of the studies a worklist page showed', async () => {
    const study = await createStudy(db);
    const res = await request(stack.url).get('/api/studies').query({ q: study.patient.mrn }).set('Cookie', staff).expect(200);
    expect(res.body.items.map((i: { id: string }) => i.id)).toEqual([study.id]);
    const row = await lastAudit(`action = 'search' AND actor_role = 'staff'`);
    expect(row.detail).toMatchObject({ q: study.patient.mrn, returned: 1, studyIds: [study.id] });
    // …so "who saw this study" is one query.
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM audit_event WHERE detail->'studyIds' ? $1`, [study.id]);
    expect(n).toBe(1);
  });
});

describe('forwarded addresses', () => {
  it('are ignored without a configured proxy: the audited address is the connection’s', async () => {
    await request(stack.url).get('/api/auth/callback?error=access_denied').set('X-Forwarded-For', '203.0.113.9').expect(303);
    const row = await lastAudit(`action = 'sign-in-failed'`);
    expect(row.client_address).toMatch(/^(::ffff:)?127\.0\.0\.1$/);
  });

  it('cannot dodge the sign-in limit by changing X-Forwarded-For', async () => {
    const limited = await startStack(db, { signInRateLimit: 2 });
    try {
      const statuses: number[] = [];
      for (let i = 0; i < 4; i++) {
        const res = await request(limited.url).get('/api/auth/callback?error=x').set('X-Forwarded-For', `198.51.100.${i + 1}`);
        statuses.push(res.status);
      }
      expect(statuses).toEqual([303, 303, 429, 429]);
    } finally {
      await limited.close();
    }
  });

  it('are believed from a configured proxy (TRUST_PROXY)', async () => {
    const proxied = await startStack(db, { trustProxy: ['loopback'] });
    try {
      await request(proxied.url).get('/api/auth/callback?error=access_denied').set('X-Forwarded-For', '203.0.113.9').expect(303);
      const row = await lastAudit(`action = 'sign-in-failed'`);
      expect(row.client_address).toBe('203.0.113.9');
    } finally {
      await proxied.close();
    }
  });
});

describe('a create refused because the MRN belongs to someone else', () => {
  it('says only that, and records which fields differed in the audit trail', async () => {
    const patient = { mrn: `AQ-${randomUUID().slice(0, 8)}`, familyName: 'Vesterlund', givenName: 'Maj', birthDate: '1950-05-05', sex: 'female' };
    await request(stack.url).post('/api/studies').set('Cookie', staff).set('Origin', stack.url).send({ patient }).expect(201);
    const res = await request(stack.url).post('/api/studies').set('Cookie', staff).set('Origin', stack.url).send({ patient: { ...patient, birthDate: '1951-05-05' } }).expect(409);
    expect(JSON.stringify(res.body)).not.toMatch(/birth/i);
    expect(res.body.errors).toEqual([{ pointer: '/patient/mrn', detail: 'This MRN is on file for another patient. Check the MRN.' }]);
    const row = await lastAudit(`action = 'create' AND outcome = 'failure'`);
    expect(row.detail).toEqual({ reason: 'patient-mismatch', mrn: patient.mrn, differs: ['birthDate'] });
  });
});
