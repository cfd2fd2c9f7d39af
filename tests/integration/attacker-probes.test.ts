import { randomUUID } from 'node:crypto';
import http from 'node:http';
import path from 'node:path';
import zlib from 'node:zlib';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { emptyDetails, emptyFindings, emptyVessel } from '../../shared/study/schema';
import { permissionTable, type Permission, type Role } from '../../shared/auth/permissions';
import { openTestDatabase } from '../support/app';
import { signedCodingStudy } from '../support/coding';
import { completeStudy } from '../support/reports';
import { parseCsv } from '../../shared/csv/neutralise';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

// What a client with a valid account of each role, or none, can make the server do. Each refusal is a
// 4xx problem+json (RFC 9457) naming the field by a JSON pointer (RFC 6901), never a 500.

const attachmentDir = path.resolve('.data/test-attachments-attacker');
let db: DataSource;
let stack: TestStack;
const cookies: Record<string, string> = {};
let physicianId: string;
let coderId: string;

beforeAll(async () => {
  db = await openTestDatabase();
  // The product's default size limit, 20 MB (ATTACHMENT_MAX_MB, inclusive).
  stack = await startStack(db, { attachments: { dir: attachmentDir, maxBytes: 20 * 1024 * 1024, maxConcurrentUploads: 4 } });
  for (const role of ['staff', 'physician', 'coder', 'chief', 'admin', null] as const) cookies[role ?? 'none'] = (await signIn(stack, usernameOf(role))).cookie;
  [{ id: physicianId }] = await db.query(`SELECT id FROM app_user WHERE role = 'physician' ORDER BY last_sign_in_at DESC NULLS LAST LIMIT 1`);
  [{ id: coderId }] = await db.query(`SELECT id FROM app_user WHERE role = 'coder' LIMIT 1`);
}, 120_000);
afterAll(async () => {
  await stack.close();
  await db.destroy();
});

const api = () => request(stack.url);
const as = (role: string) => cookies[role];
const newPatient = () => ({ mrn: `AP-${randomUUID().slice(0, 8)}`, familyName: 'Quillfeather', givenName: 'Odile', birthDate: '1961-05-04', sex: 'female' });
const pointers = (body: { errors?: { pointer: string }[] }) => (body.errors ?? []).map((e) => e.pointer);
const lastAuditId = async () => (await db.query(`SELECT coalesce(max(id), 0)::text AS id FROM audit_event`))[0].id as string;

function expectClientProblem(res: { status: number; headers: Record<string, string>; body: unknown }, pointer?: string) {
  expect(res.status, JSON.stringify(res.body)).toBeGreaterThanOrEqual(400);
  expect(res.status).toBeLessThan(500);
  expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
  if (pointer) expect(pointers(res.body as { errors?: { pointer: string }[] })).toContain(pointer);
}

async function newStudy(): Promise<{ id: string; version: number }> {
  const res = await api().post('/api/studies').set('Cookie', as('staff')).set('Origin', stack.url).send({ patient: newPatient() }).expect(201);
  return res.body;
}

function rawRequest(method: string, pathAndQuery: string, headers: Record<string, string>, body?: Buffer): Promise<{ status: number; headers: http.IncomingHttpHeaders; body: string }> {
  const url = new URL(stack.url);
  return new Promise((resolve, reject) => {
    const req = http.request({ host: url.hostname, port: url.port, method, path: pathAndQuery, headers }, (res) => {
      const chunks: Buffer[] = [];
      res.on('data', (c) => chunks.push(c));
      res.on('end', () => resolve({ status: res.statusCode!, headers: res.headers, body: Buffer.concat(chunks).toString('utf8') }));
    });
    req.on('error', reject);
    if (body) req.write(body);
    req.end();
  });
}

describe('1. hostile values', () => {
  it('NUL in a vessel note and in findings text of a study PATCH names the field', async () => {
    const study = await newStudy();
    const res = await api()
      .patch(`/api/studies/${study.id}`)
      .set('Cookie', as('staff'))
      .set('Origin', stack.url)
      .send({ version: study.version, vessels: [{ ...emptyVessel(randomUUID(), 'LAD'), notes: 'a\u0000b' }], findings: { ...emptyFindings(), impression: 'x\u0000' } });
    expectClientProblem(res, '/vessels/0/notes');
    expect(pointers(res.body)).toContain('/findings/impression');
  });

  it('NUL and lone surrogates in the MRN and in search parameters of every list', async () => {
    const created = await api().post('/api/studies').set('Cookie', as('staff')).set('Origin', stack.url).send({ patient: { ...newPatient(), mrn: 'M\u0000' } });
    expectClientProblem(created, '/patient/mrn');
    const surrogate = await api()
      .post('/api/studies')
      .set('Cookie', as('staff'))
      .set('Origin', stack.url)
      .set('Content-Type', 'application/json')
      .send(JSON.stringify({ patient: { ...newPatient(), givenName: 'Od@' } }).replace('@', '\\udfff'));
    expectClientProblem(surrogate, '/patient/givenName');
    for (const [role, url, name] of [
      ['chief', '/api/audit-trail?q=a%00', '/q'],
      ['chief', '/api/audit-trail?patient=a%00', '/patient'],
      ['coder', '/api/coding/queue?status=%00', '/status'],
      ['chief', '/api/audit-trail/export?q=%ED%B0%80', '/q'],
    ] as const) {
      const res = await api().get(url).set('Cookie', as(role));
      expectClientProblem(res, name);
    }
  });

  // zod's datetime takes any number of fraction digits: a long fraction must not carry year 0000 or an
  // offset no IANA zone has (UTC-12:00 … UTC+14:00) past the input check.
  for (const value of ['0000-01-01T08:00:00.0000000000000000000000000000001Z', '2025-03-01T08:00:00.00000000000000000000000000001-23:59', '2025-03-01T08:00:00.00000000000000000000000000001-15:30']) {
    it(`${value.slice(0, 10)}…${value.slice(-6)} with a long fraction is refused naming the field`, async () => {
      const study = await newStudy();
      const res = await api().patch(`/api/studies/${study.id}`).set('Cookie', as('staff')).set('Origin', stack.url).send({ version: study.version, details: { ...emptyDetails(), procedureStartedAt: value } });
      expectClientProblem(res, '/details/procedureStartedAt');
    });
    it(`${value.slice(0, 10)}…${value.slice(-6)} with a long fraction is never a 500 in the audit trail filter`, async () => {
      const res = await api().get('/api/audit-trail').query({ from: value }).set('Cookie', as('chief'));
      expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBeLessThan(500);
      if (res.status >= 400) expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    });
  }

  it('year 0000 and offset -23:59 in the audit trail filter', async () => {
    expectClientProblem(await api().get('/api/audit-trail').query({ from: '0000-01-01T00:00:00Z' }).set('Cookie', as('chief')), '/from');
    expectClientProblem(await api().get('/api/audit-trail').query({ to: '2025-01-01T00:00:00-23:59' }).set('Cookie', as('chief')), '/to');
  });

  it('an operator who does not exist, or is a coder, is refused on change', async () => {
    const study = await newStudy();
    for (const operatorId of [randomUUID(), coderId]) {
      const res = await api().patch(`/api/studies/${study.id}`).set('Cookie', as('staff')).set('Origin', stack.url).send({ version: study.version, details: { ...emptyDetails(), operatorId } });
      expectClientProblem(res, '/details/operatorId');
    }
  });

  it('a well-formed cursor holding an impossible date is refused by the audit trail, its export and the worklist', async () => {
    const forged = Buffer.from(JSON.stringify(['2025-02-30 10:00:00+00', '99999'])).toString('base64url');
    const forgedStudy = Buffer.from(JSON.stringify(['0000-01-01 10:00:00+00', randomUUID()])).toString('base64url');
    expectClientProblem(await api().get('/api/audit-trail').query({ cursor: forged }).set('Cookie', as('chief')), '/cursor');
    expectClientProblem(await api().get('/api/audit-events').query({ cursor: forged }).set('Cookie', as('chief')), '/cursor');
    expectClientProblem(await api().get('/api/studies').query({ cursor: forgedStudy }).set('Cookie', as('staff')), '/cursor');
  });

  const idRoutes: Array<[string, string, string]> = [
    ['GET', '/api/attachments/%s/content', 'staff'],
    ['DELETE', '/api/attachments/%s', 'staff'],
    ['GET', '/api/reports/%s/pdf', 'staff'],
    ['GET', '/api/studies/%s/report', 'staff'],
    ['GET', '/api/studies/%s/deliveries', 'staff'],
    ['PATCH', '/api/studies/%s', 'staff'],
    ['GET', '/api/coding/studies/%s', 'coder'],
    ['POST', '/api/report-versions/%s/resend', 'admin'],
    ['GET', '/api/admin/report-templates/%s', 'admin'],
  ];
  for (const [method, template, role] of idRoutes) {
    it(`answers "%" and "%ff" as the id of ${method} ${template} with 400 naming the parameter`, async () => {
      for (const raw of ['%', '%ff']) {
        const res = await rawRequest(method, template.replace('%s', raw), { cookie: as(role), origin: stack.url, 'content-type': 'application/json' }, method === 'GET' || method === 'DELETE' ? undefined : Buffer.from('{}'));
        expect(res.status).toBe(400);
        expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
        expect(JSON.parse(res.body).errors.map((e: { pointer: string }) => e.pointer).some((p: string) => p === '/id' || p === '/version')).toBe(true);
      }
    });
  }

  it('answers a corrupt gzip, deflate and br body of a study PATCH with 400', async () => {
    const study = await newStudy();
    for (const [encoding, body] of [
      ['gzip', zlib.gzipSync('{"version":1}').subarray(0, 12)],
      ['deflate', Buffer.from('not deflate')],
      ['br', Buffer.from([0xff, 0x00, 0x12])],
    ] as const) {
      const res = await rawRequest('PATCH', `/api/studies/${study.id}`, { cookie: as('staff'), origin: stack.url, 'content-type': 'application/json', 'content-encoding': encoding }, body);
      expect(res.status, `${encoding}: ${res.body}`).toBe(400);
      expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    }
  });

  it('the sign-in callback with error=%00 or a lone surrogate answers 4xx', async () => {
    for (const q of ['error=%00', 'error=%ED%A0%80', 'code=%00&state=%00']) {
      const res = await api().get(`/api/auth/callback?${q}`);
      expect(res.status, q).toBeGreaterThanOrEqual(400);
      expect(res.status).toBeLessThan(500);
    }
  });
});

// Every route with a valid-looking body or id; what matters is 401/403 against anything else.
const someId = '00000000-0000-4000-8000-000000000000';
const routeAccess: Array<[string, string, Permission | 'signed-in']> = [
  ['GET', '/api/studies', 'study:read'],
  ['POST', '/api/studies', 'study:write'],
  ['GET', `/api/studies/${someId}`, 'study:read'],
  ['PATCH', `/api/studies/${someId}`, 'study:write'],
  ['GET', `/api/studies/${someId}/analysis`, 'study:read'],
  ['GET', '/api/operators', 'study:read'],
  ['POST', `/api/studies/${someId}/attachments`, 'study:write'],
  ['GET', `/api/attachments/${someId}/content`, 'study:read'],
  ['DELETE', `/api/attachments/${someId}`, 'study:write'],
  ['GET', `/api/studies/${someId}/report`, 'study:read'],
  ['POST', `/api/studies/${someId}/sign`, 'study:sign'],
  ['GET', `/api/reports/${someId}/pdf`, 'study:read'],
  ['GET', '/api/awaiting-signature', 'study:read'],
  ['GET', '/api/settings/thresholds', 'study:read'],
  ['GET', '/api/coding/queue', 'coding:read'],
  ['GET', `/api/coding/studies/${someId}`, 'coding:read'],
  ['POST', `/api/coding/studies/${someId}/decisions`, 'coding:review'],
  ['POST', `/api/coding/studies/${someId}/codes`, 'coding:review'],
  ['POST', `/api/coding/studies/${someId}/complete`, 'coding:review'],
  ['GET', '/api/coding/export?from=2025-01-01&to=2025-01-02', 'coding:read'],
  ['GET', '/api/turnaround/figures', 'turnaround:read'],
  ['GET', '/api/turnaround/export', 'turnaround:read'],
  ['GET', '/api/turnaround/awaiting-signature', 'turnaround:read'],
  ['GET', '/api/audit-trail', 'audit:read'],
  ['GET', '/api/audit-trail/export', 'audit:read'],
  ['GET', '/api/audit-events', 'audit:read'],
  ['GET', '/api/deliveries', 'delivery:manage'],
  ['POST', `/api/report-versions/${someId}/resend`, 'delivery:manage'],
  ['GET', '/api/admin/users', 'admin:manage'],
  ['GET', '/api/admin/role-mapping', 'admin:manage'],
  ['GET', '/api/admin/thresholds', 'admin:manage'],
  ['POST', '/api/admin/thresholds', 'admin:manage'],
  ['GET', '/api/admin/lab-settings', 'admin:manage'],
  ['PUT', '/api/admin/lab-settings', 'admin:manage'],
  ['GET', '/api/admin/report-templates', 'admin:manage'],
  ['GET', '/api/admin/report-templates/v1', 'admin:manage'],
  ['POST', '/api/admin/report-templates/active', 'admin:manage'],
  ['GET', '/api/dev/caught-mail', 'admin:manage'],
  ['GET', '/api/me', 'signed-in'],
];

describe('2. route × role', () => {
  for (const role of ['staff', 'physician', 'coder', 'chief', 'admin', 'none', 'anonymous'] as const) {
    it(`${role}: 403 exactly where the permission table says no, 401 when signed out`, async () => {
      const wrong: string[] = [];
      for (const [method, url, access] of routeAccess) {
        let req = api()[method.toLowerCase() as 'get'](url).set('Origin', stack.url);
        if (role !== 'anonymous') req = req.set('Cookie', as(role));
        const res = method === 'GET' || method === 'DELETE' ? await req : await req.send({});
        const allowed = role !== 'anonymous' && role !== 'none' ? access === 'signed-in' || (permissionTable[access] as readonly Role[]).includes(role) : role === 'none' && access === 'signed-in';
        const expected = role === 'anonymous' ? 401 : allowed ? 'not 401/403' : 403;
        const ok = expected === 'not 401/403' ? res.status !== 401 && res.status !== 403 && res.status < 500 : res.status === expected;
        if (!ok) wrong.push(`${method} ${url} → ${res.status}`);
      }
      expect(wrong).toEqual([]);
    });
  }

  it('a coder, a chief and the no-role user cannot change a study through the transitions route', async () => {
    const study = await completeStudy(stack.url, as('staff'));
    for (const role of ['coder', 'chief', 'none']) {
      const res = await api().post(`/api/studies/${study.id}/transitions`).set('Cookie', as(role)).set('Origin', stack.url).send({ action: 'mark-ready', version: study.version });
      expect(res.status, role).toBeGreaterThanOrEqual(400);
      expect(res.status).toBeLessThan(500);
    }
    const [row] = await db.query(`SELECT state, version FROM study WHERE id = $1`, [study.id]);
    expect(row.version).toBe(study.version);
  });

  it('coding review of a study that was never signed is not found, even for a coder', async () => {
    const study = await newStudy();
    expect((await api().get(`/api/coding/studies/${study.id}`).set('Cookie', as('coder'))).status).toBe(404);
    const res = await api().post(`/api/coding/studies/${study.id}/complete`).set('Cookie', as('coder')).set('Origin', stack.url).send({});
    expect(res.status).toBeGreaterThanOrEqual(400);
    expect(res.status).toBeLessThan(500);
  });

  it('the chief reads a coding review but cannot record a decision on it', async () => {
    const study = await signedCodingStudy(db, physicianId, 'Vexbury');
    expect((await api().get(`/api/coding/studies/${study.id}`).set('Cookie', as('chief'))).status).toBe(200);
    expect((await api().post(`/api/coding/studies/${study.id}/complete`).set('Cookie', as('chief')).set('Origin', stack.url).send({})).status).toBe(403);
  });
});

describe('3. uploads', () => {
  const png = Buffer.from('89504e470d0a1a0a0000000d4948445200000001000000010806000000', 'hex');
  const upload = (studyId: string, bytes: Buffer, name: string) => api().post(`/api/studies/${studyId}/attachments`).set('Cookie', as('staff')).set('Origin', stack.url).attach('file', bytes, name);

  it('a PNG named .html, .exe or .svg is refused', async () => {
    const study = await newStudy();
    for (const name of ['x.html', 'x.exe', 'x.svg', 'x.png.html']) expect((await upload(study.id, png, name)).status, name).toBe(415);
  });

  it('a name is decoded as UTF-8 and loses control and direction-override characters', async () => {
    const study = await newStudy();
    const res = await upload(study.id, png, 'Blåbær\u202Egnp.\u2066x\u2069.png');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.fileName).toBe('Blåbærgnp.x.png');
    // A control character in the raw header: refused, or stored without it.
    const raw = await rawRequest(
      'POST',
      `/api/studies/${study.id}/attachments`,
      { cookie: as('staff'), origin: stack.url, 'content-type': 'multipart/form-data; boundary=XyZ' },
      Buffer.concat([
        Buffer.from('--XyZ\r\nContent-Disposition: form-data; name="file"; filename="a\u0007\u001b[31mb.png"\r\nContent-Type: image/png\r\n\r\n', 'latin1'),
        png,
        Buffer.from('\r\n--XyZ--\r\n', 'latin1'),
      ]),
    );
    expect(raw.status).toBeLessThan(500);
    if (raw.status === 201) expect(JSON.parse(raw.body).fileName).toBe('a[31mb.png');
    const names: { file_name: string }[] = await db.query(`SELECT file_name FROM attachment WHERE study_id = $1`, [study.id]);
    for (const n of names) expect(n.file_name).not.toMatch(/[\u0000-\u001F\u007F-\u009F\u202A-\u202E\u2066-\u2069]/);
  });

  it('exactly 20 MB is accepted, 20 MB and one byte refused', async () => {
    const study = await newStudy();
    const exact = Buffer.alloc(20 * 1024 * 1024, 0);
    png.copy(exact);
    expect((await upload(study.id, exact, 'big.png')).status).toBe(201);
    const over = Buffer.alloc(20 * 1024 * 1024 + 1, 0);
    png.copy(over);
    const res = await upload(study.id, over, 'big.png');
    expect(res.status).toBe(413);
  }, 60_000);

  // A tab-separated upload's cell "1,=1+1" must come back quoted: a spreadsheet may split a .csv on commas.
  it('a downloaded CSV has no cell a spreadsheet would run, in any delimiter it may be split on', async () => {
    const study = await newStudy();
    // Tab-separated by its first line; the second row's first cell holds a comma and then a formula.
    const csv = 'time\tpd\n0.1\t-3.2\n1,=1+1\t  =2+2\n2\t\uFF1D3+3\n';
    const up = await upload(study.id, Buffer.from(csv), 'trace.csv');
    expect(up.status, JSON.stringify(up.body)).toBe(201);
    const down = await api().get(`/api/attachments/${up.body.id}/content`).set('Cookie', as('staff')).buffer(true).parse((res, cb) => {
      let t = '';
      res.on('data', (c: Buffer) => (t += c.toString('utf8')));
      res.on('end', () => cb(null, t));
    });
    const text = down.body as string;
    expect(text).toContain('-3.2');
    expect(text).toContain("'  =2+2");
    expect(text).toContain("'\uFF1D3+3");
    // Read as a spreadsheet would with each separator it may choose (quotes honoured, RFC 4180): no cell may start a formula.
    const cells = [',', ';', '\t'].flatMap((d) => parseCsv(text, d).flatMap((row) => row.cells));
    expect(cells.filter((c) => /^[ \u3000]*[=+@\uFF1D\uFF0B\uFF20]/.test(c))).toEqual([]);
  });
});

describe('3b. CSV exports', () => {
  it('the turnaround export quotes a cell holding a semicolon, as the other exports do', async () => {
    const { createPhysician, signCompleteStudy } = await import('../support/signing');
    const physician = await createPhysician(db, 'Dr Probe;=1+1');
    await signCompleteStudy(db, physician);
    const today = new Date().toISOString().slice(0, 10);
    const res = await api().get('/api/turnaround/export').query({ from: '2024-01-01', to: today }).set('Cookie', as('chief')).buffer(true).parse((r, cb) => {
      let t = '';
      r.on('data', (c: Buffer) => (t += c.toString('utf8')));
      r.on('end', () => cb(null, t));
    });
    expect(res.status).toBe(200);
    const text = res.body as string;
    expect(text).toContain('Dr Probe');
    // Read as a spreadsheet set to a semicolon list separator does, where the comma file's quotes sit
    // inside its cells and count for nothing: no cell may start a formula.
    const cells = text.split(/\r?\n/).flatMap((line) => line.split(';'));
    expect(cells.filter((c) => /^[ \u3000]*[=+@]/.test(c))).toEqual([]);
  });

  it('the audit CSV export neutralises formula text typed into a search', async () => {
    await api().get('/api/studies').query({ q: '=HYPERLINK(1)' }).set('Cookie', as('staff')).expect(200);
    const res = await api().get('/api/audit-trail/export').query({ action: 'search' }).set('Cookie', as('chief')).buffer(true).parse((r, cb) => {
      let t = '';
      r.on('data', (c: Buffer) => (t += c.toString('utf8')));
      r.on('end', () => cb(null, t));
    });
    expect(res.status).toBe(200);
    const cells = (res.body as string).split(/\r?\n/).flatMap((line) => line.split(/[,;\t]/)).map((c) => c.replace(/^"/, ''));
    expect(cells.filter((c) => /^[ \u3000]*[=+@]/.test(c))).toEqual([]);
  });
});

describe('2b. signed records', () => {
  it('an upload to a signed study is refused with a 4xx, not a 500', async () => {
    const { createPhysician, signCompleteStudy } = await import('../support/signing');
    const signed = await signCompleteStudy(db, await createPhysician(db));
    const png = Buffer.from('89504e470d0a1a0a0000000d4948445200000001000000010806000000', 'hex');
    const res = await api().post(`/api/studies/${signed.studyId}/attachments`).set('Cookie', as('staff')).set('Origin', stack.url).attach('file', png, 'late.png');
    expectClientProblem(res);
    const patch = await api().patch(`/api/studies/${signed.studyId}`).set('Cookie', as('physician')).set('Origin', stack.url).send({ version: 1, details: emptyDetails() });
    expectClientProblem(patch);
  });
});

describe('4. audit', () => {
  // The queue shows names, MRNs and birth dates: its audit entry names the studies shown.
  it('a coding queue read records which study ids were shown', async () => {
    const study = await signedCodingStudy(db, physicianId, 'Wrexham');
    const before = await lastAuditId();
    const res = await api().get('/api/coding/queue').set('Cookie', as('coder')).expect(200);
    expect(res.body.items.map((i: { id?: string; studyId?: string }) => i.id ?? i.studyId)).toContain(study.id);
    const [row] = await db.query(`SELECT detail FROM audit_event WHERE id > $1 AND action = 'search' ORDER BY id DESC LIMIT 1`, [before]);
    expect(JSON.stringify(row.detail)).toContain(study.id);
  });

  it('the worklist read records which study ids were shown', async () => {
    const study = await newStudy();
    const before = await lastAuditId();
    await api().get('/api/studies').set('Cookie', as('staff')).expect(200);
    const [row] = await db.query(`SELECT detail FROM audit_event WHERE id > $1 AND action = 'search' ORDER BY id DESC LIMIT 1`, [before]);
    expect(row.detail.studyIds).toContain(study.id);
  });

  it('the list of deliveries (accessions) is audited', async () => {
    const before = await lastAuditId();
    await api().get('/api/deliveries').set('Cookie', as('chief')).expect(200);
    const rows = await db.query(`SELECT action FROM audit_event WHERE id > $1`, [before]);
    expect(rows.length).toBeGreaterThan(0);
  });

  it('X-Forwarded-For neither forges the audited address nor escapes the sign-in rate limit', async () => {
    const limited = await startStack(db, { signInRateLimit: 3 });
    try {
      const own = await Promise.all([0, 1, 2, 3, 4].map((i) => request(limited.url).get('/api/auth/sign-in').set('X-Forwarded-For', `198.51.100.${i}`).redirects(0)));
      expect(own.map((r) => r.status).filter((s) => s === 429).length).toBeGreaterThanOrEqual(2);
      const before = await lastAuditId();
      await request(limited.url).get('/api/auth/callback?error=x').set('X-Forwarded-For', '198.51.100.77').redirects(0);
      const [row] = await db.query(`SELECT client_address FROM audit_event WHERE id > $1 ORDER BY id DESC LIMIT 1`, [before]);
      expect(row?.client_address ?? '').not.toContain('198.51.100.77');
    } finally {
      await limited.close();
    }
  });

  it('reading and exporting the audit trail, and reading and changing lab settings, are audited', async () => {
    const before = await lastAuditId();
    await api().get('/api/audit-trail').set('Cookie', as('chief')).expect(200);
    await api().get('/api/audit-trail/export').set('Cookie', as('chief')).expect(200);
    const view = await api().get('/api/admin/lab-settings').set('Cookie', as('admin')).expect(200);
    const changed = await api().put('/api/admin/lab-settings').set('Cookie', as('admin')).set('Origin', stack.url).send({ settings: { ...view.body.stored, templateVersion: undefined, signatureTargetHours: view.body.stored.signatureTargetHours === 24 ? 25 : 24 }, version: view.body.version }).expect(200);
    // Put the target back: other test files share this database.
    await api().put('/api/admin/lab-settings').set('Cookie', as('admin')).set('Origin', stack.url).send({ settings: { ...view.body.stored, templateVersion: undefined }, version: changed.body.version }).expect(200);
    const rows: { action: string; entity_type: string | null }[] = await db.query(`SELECT action, entity_type FROM audit_event WHERE id > $1 ORDER BY id`, [before]);
    const seen = rows.map((r) => `${r.action}:${r.entity_type}`);
    expect(seen).toContain('search:audit-event');
    expect(seen).toContain('export:audit-event');
    expect(seen.filter((s) => s.includes('setting')).length, JSON.stringify(seen)).toBeGreaterThanOrEqual(2);
  });
});

describe('6. other', () => {
  it('state changes need an allowed Origin (or Referer): none, null or another site is refused', async () => {
    for (const headers of [{}, { Origin: 'null' }, { Origin: 'http://evil.example' }, { Referer: 'http://evil.example/x' }, { Origin: `${stack.url}.evil.example` }]) {
      let req = api().post('/api/studies').set('Cookie', as('staff'));
      for (const [k, v] of Object.entries(headers)) req = req.set(k, v);
      expect((await req.send({ patient: newPatient() })).status, JSON.stringify(headers)).toBe(403);
    }
    expect((await api().post('/api/auth/sign-out').set('Cookie', as('staff')).send({})).status).toBe(403);
  });

  it('a session id planted before sign-in is not the one after it', async () => {
    const first = await api().get('/api/auth/sign-in').redirects(0);
    const planted = (first.headers['set-cookie'] as unknown as string[])[0].split(';')[0];
    const res = await api().get('/api/me').set('Cookie', planted);
    expect(res.status).toBe(401);
    for (const c of Object.values(cookies)) expect(c).not.toContain(planted.split('=')[1]);
  });

  it('return-to cannot lead off the site after sign-in', async () => {
    for (const returnTo of ['//evil.example/', '/\\evil.example', '/\t/evil.example', 'https://evil.example', '/%2F/evil.example', '/\\\\evil.example']) {
      const { landedOn } = await signIn(stack, usernameOf('staff'), { returnTo });
      expect(landedOn.startsWith('/'), returnTo).toBe(true);
      const resolved = new URL(landedOn, stack.url);
      expect(resolved.origin, `${returnTo} → ${landedOn}`).toBe(stack.url);
      expect(landedOn.startsWith('//') || landedOn.startsWith('/\\'), landedOn).toBe(false);
    }
  });

  it('the admin cannot point EHR delivery at a loopback or link-local address', async () => {
    const view = await api().get('/api/admin/lab-settings').set('Cookie', as('admin')).expect(200);
    const stored = { ...view.body.stored };
    delete stored.templateVersion;
    for (const ehrBaseUrl of ['http://169.254.169.254/latest/meta-data', 'http://127.0.0.1:5432/fhir', 'http://[::1]:22/']) {
      const res = await api().put('/api/admin/lab-settings').set('Cookie', as('admin')).set('Origin', stack.url).send({ settings: { ...stored, ehrBaseUrl }, version: view.body.version });
      expectClientProblem(res, '/settings/ehrBaseUrl');
    }
  });

  it('the mail sender cannot carry a header or a second address', async () => {
    const view = await api().get('/api/admin/lab-settings').set('Cookie', as('admin')).expect(200);
    const stored = { ...view.body.stored };
    delete stored.templateVersion;
    for (const mailFrom of ['a@b.example\r\nBcc: x@evil.example', 'Lab <a@b.example>\nBcc: x@evil.example', 'a@b.example, x@evil.example', 'Lab; x@evil.example <a@b.example>', 'Lab <a@b.example>, <x@evil.example>']) {
      const res = await api().put('/api/admin/lab-settings').set('Cookie', as('admin')).set('Origin', stack.url).send({ settings: { ...stored, mailFrom }, version: view.body.version });
      expectClientProblem(res, '/settings/mailFrom');
    }
  });

  it('free text with markup is escaped in the report preview', async () => {
    const study = await completeStudy(stack.url, as('staff'));
    const payload = '<img src=x onerror=alert(1)><script>alert(2)</script>{{7*7}}';
    const patched = await api()
      .patch(`/api/studies/${study.id}`)
      .set('Cookie', as('staff'))
      .set('Origin', stack.url)
      .send({ version: study.version, details: { ...study.details, indication: payload }, findings: { ...study.findings, impression: payload } })
      .expect(200);
    const preview = await api().get(`/api/studies/${patched.body.id}/report`).set('Cookie', as('physician')).expect(200);
    expect(Object.keys(preview.body)).toContain('html');
    const html = String(preview.body.html);
    expect(html).toContain('&lt;img src');
    expect(html).toContain('&lt;script&gt;');
    expect(html).not.toMatch(/<img src|<script>alert/);
  });

  it('a template version name cannot walk out of the templates folder', async () => {
    for (const v of ['..%2F..%2Fpackage.json', '..', 'v1%2F..%2F..%2Fserver', '%2e%2e']) {
      const res = await api().get(`/api/admin/report-templates/${v}`).set('Cookie', as('admin'));
      expect(res.status, v).toBeGreaterThanOrEqual(400);
      expect(res.status).toBeLessThan(500);
      expect(JSON.stringify(res.body)).not.toMatch(/"dependencies"|createApp/);
    }
    const act = await api().post('/api/admin/report-templates/active').set('Cookie', as('admin')).set('Origin', stack.url).send({ version: '../v1' });
    expectClientProblem(act, '/version');
  });
});
