import { randomUUID } from 'node:crypto';
import http from 'node:http';
import zlib from 'node:zlib';
import request from 'supertest';
import express from 'express';
import { z } from 'zod';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { problemHandler } from '../../server/http/problem';
import { emptyDetails } from '../../shared/study/schema';
import { openTestDatabase } from '../support/app';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

// Inputs an attacker or a broken client can send. Each must be answered with a 4xx problem+json
// that names the field at fault (RFC 9457 problem details, RFC 6901 pointers), never a 500.

let db: DataSource;
let stack: TestStack;
let staff: string;
let adminId: string;
let physicianId: string;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
  staff = (await signIn(stack, usernameOf('staff'))).cookie;
  await signIn(stack, usernameOf('admin'));
  await signIn(stack, usernameOf('physician'));
  [{ id: adminId }] = await db.query(`SELECT id FROM app_user WHERE role = 'admin' LIMIT 1`);
  [{ id: physicianId }] = await db.query(`SELECT id FROM app_user WHERE role = 'physician' LIMIT 1`);
});
afterAll(async () => {
  await stack.close();
  await db.destroy();
});

const api = () => request(stack.url);
const newPatient = () => ({ mrn: `H-${randomUUID().slice(0, 8)}`, familyName: 'Quarles', givenName: 'Ines', birthDate: '1958-03-02', sex: 'female' });
const pointers = (body: { errors?: { pointer: string }[] }) => (body.errors ?? []).map((e) => e.pointer);

function expectProblem(res: request.Response, status: number | 'client', pointer?: string) {
  if (status === 'client') {
    expect(res.status).toBeGreaterThanOrEqual(400);
    expect(res.status).toBeLessThan(500);
  } else {
    expect(res.status).toBe(status);
  }
  expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
  expect(res.body.status).toBe(res.status);
  if (pointer) expect(pointers(res.body)).toContain(pointer);
}

async function createStudy(): Promise<{ id: string; version: number }> {
  const res = await api().post('/api/studies').set('Cookie', staff).set('Origin', stack.url).send({ patient: newPatient() }).expect(201);
  return res.body;
}

describe('text the database cannot store', () => {
  it('refuses a NUL character in a body field with 422 naming it', async () => {
    const res = await api()
      .post('/api/studies')
      .set('Cookie', staff)
      .set('Origin', stack.url)
      .send({ patient: { ...newPatient(), familyName: 'Qua\u0000rles' } });
    expectProblem(res, 422, '/patient/familyName');
  });

  it('refuses a NUL character in a query parameter with 422 naming it', async () => {
    const res = await api().get('/api/studies?q=ab%00cd').set('Cookie', staff);
    expectProblem(res, 422, '/q');
  });

  it('refuses a lone surrogate in a body field with 422 naming it', async () => {
    const study = await createStudy();
    // JSON may escape a lone surrogate (RFC 8259 §8.2 allows it; the result is not Unicode text).
    const res = await api()
      .patch(`/api/studies/${study.id}`)
      .set('Cookie', staff)
      .set('Origin', stack.url)
      .set('Content-Type', 'application/json')
      .send(`{"version": ${study.version}, "details": ${JSON.stringify({ ...emptyDetails(), indication: 'LAD @ lesion' }).replace('@', '\\ud800')}}`);
    expectProblem(res, 422, '/details/indication');
    const [row] = await db.query(`SELECT version FROM study WHERE id = $1`, [study.id]);
    expect(row.version).toBe(study.version);
  });

  it('refuses a lone surrogate in a query parameter', async () => {
    const res = await api().get('/api/studies?q=%ED%A0%80').set('Cookie', staff);
    // %ED%A0%80 is the UTF-8-shaped encoding of U+D800, which UTF-8 forbids (RFC 3629 §3).
    expectProblem(res, 'client');
  });
});

describe('impossible timestamps', () => {
  it('refuses a procedure start in year 0000 (ISO 8601 years start at 0001 in PostgreSQL)', async () => {
    const study = await createStudy();
    const res = await api()
      .patch(`/api/studies/${study.id}`)
      .set('Cookie', staff)
      .set('Origin', stack.url)
      .send({ version: study.version, details: { ...emptyDetails(), procedureStartedAt: '0000-01-01T08:00:00Z' } });
    expectProblem(res, 422, '/details/procedureStartedAt');
  });

  it('refuses an offset of -23:59 (real offsets lie within -12:00 … +14:00, IANA tz database)', async () => {
    const study = await createStudy();
    const res = await api()
      .patch(`/api/studies/${study.id}`)
      .set('Cookie', staff)
      .set('Origin', stack.url)
      .send({ version: study.version, details: { ...emptyDetails(), procedureStartedAt: '2025-03-01T08:00:00-23:59' } });
    expectProblem(res, 422, '/details/procedureStartedAt');
  });

  it('refuses such a timestamp in the worklist filter too', async () => {
    const res = await api().get('/api/studies').query({ from: '0000-01-01T00:00:00Z' }).set('Cookie', staff);
    expectProblem(res, 422, '/from');
    const offset = await api().get('/api/studies').query({ to: '2025-01-01T00:00:00-23:59' }).set('Cookie', staff);
    expectProblem(offset, 422, '/to');
  });

  it('refuses a well-formed cursor holding an impossible date with 400 naming the cursor', async () => {
    const forged = Buffer.from(JSON.stringify(['2025-02-30 10:00:00+00', randomUUID()])).toString('base64url');
    const res = await api().get('/api/studies').query({ cursor: forged }).set('Cookie', staff);
    expectProblem(res, 400, '/cursor');
  });
});

describe('operator', () => {
  it('refuses an operator id that belongs to no user', async () => {
    const res = await api()
      .post('/api/studies')
      .set('Cookie', staff)
      .set('Origin', stack.url)
      .send({ patient: newPatient(), details: { operatorId: randomUUID() } });
    expectProblem(res, 422, '/details/operatorId');
  });

  it('refuses an administrator as operator, on create and on change', async () => {
    const created = await api()
      .post('/api/studies')
      .set('Cookie', staff)
      .set('Origin', stack.url)
      .send({ patient: newPatient(), details: { operatorId: adminId } });
    expectProblem(created, 422, '/details/operatorId');
    const study = await createStudy();
    const changed = await api().patch(`/api/studies/${study.id}`).set('Cookie', staff).set('Origin', stack.url).send({ version: study.version, details: { ...emptyDetails(), operatorId: adminId } });
    expectProblem(changed, 422, '/details/operatorId');
  });

  it('accepts a physician as operator', async () => {
    const study = await createStudy();
    const res = await api().patch(`/api/studies/${study.id}`).set('Cookie', staff).set('Origin', stack.url).send({ version: study.version, details: { ...emptyDetails(), operatorId: physicianId } }).expect(200);
    expect(res.body.details.operatorId).toBe(physicianId);
  });
});

describe('malformed addresses', () => {
  for (const raw of ['%', '%ff', '%E0%A4%A']) {
    it(`answers the path id "${raw}" with 400 naming the id`, async () => {
      // Raw request: a client library would normalise the malformed escape away.
      const res = await rawRequest('GET', `/api/studies/${raw}`, { cookie: staff });
      expect(res.status).toBe(400);
      expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
      expect(pointers(JSON.parse(res.body))).toContain('/id');
    });
  }
});

describe('request bodies that cannot be decoded', () => {
  const bodies: Array<[string, Buffer]> = [
    ['gzip', Buffer.concat([zlib.gzipSync(JSON.stringify({ patient: newPatient() })).subarray(0, 20), Buffer.from('garbage')])],
    ['deflate', Buffer.from('this is not deflate data')],
    ['br', Buffer.from([0xff, 0xff, 0xff, 0x00, 0x12])],
  ];
  for (const [encoding, body] of bodies) {
    it(`answers a corrupt ${encoding} body with 400`, async () => {
      const res = await rawRequest('POST', '/api/studies', { cookie: staff, origin: stack.url, 'content-type': 'application/json', 'content-encoding': encoding }, body);
      expect(res.status).toBe(400);
      expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
      expect(JSON.parse(res.body).detail).toMatch(/compressed|decod/i);
    });
  }
});

describe('sign-in callback', () => {
  it('answers error=%00 with a 4xx problem and stores no provider text', async () => {
    const before = (await db.query(`SELECT coalesce(max(id), 0)::text AS id FROM audit_event`))[0].id;
    const res = await api().get('/api/auth/callback?error=%00');
    expectProblem(res, 'client', '/error');
    const rows = await db.query(`SELECT detail::text AS d FROM audit_event WHERE id > $1`, [before]);
    for (const r of rows) expect(r.d ?? '').not.toContain('\\u0000');
  });

  it('stores a fixed reason code, not the provider error text', async () => {
    const before = (await db.query(`SELECT coalesce(max(id), 0)::text AS id FROM audit_event`))[0].id;
    await api().get('/api/auth/callback?error=access_denied&error_description=%3Cscript%3Eforged%20entry').expect(303);
    const [row] = await db.query(`SELECT detail FROM audit_event WHERE id > $1 AND action = 'sign-in-failed'`, [before]);
    expect(row.detail).toEqual({ reason: 'provider-error' });
  });
});

describe('a validation error thrown anywhere', () => {
  it('maps a ZodError to a 422 problem naming the field', async () => {
    const app = express();
    app.get('/x', () => {
      z.object({ pa: z.number().max(300) }).parse({ pa: 900 });
    });
    app.use(problemHandler(() => undefined));
    const res = await request(app).get('/x');
    expect(res.status).toBe(422);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(pointers(res.body)).toEqual(['/pa']);
  });
});

function rawRequest(method: string, path: string, headers: Record<string, string>, body?: Buffer): Promise<{ status: number; headers: http.IncomingHttpHeaders; body: string }> {
  const url = new URL(stack.url);
  return new Promise((resolve, reject) => {
    const req = http.request({ host: url.hostname, port: url.port, method, path, headers: { ...headers, ...(body ? { 'content-length': String(body.length) } : {}) } }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => resolve({ status: res.statusCode ?? 0, headers: res.headers, body: Buffer.concat(chunks).toString('utf8') }));
    });
    req.on('error', reject);
    req.end(body);
  });
}
