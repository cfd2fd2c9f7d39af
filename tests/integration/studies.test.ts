import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { emptyDose, emptyFindings, emptyVasoreactivity, emptyVessel, type StudyRecord } from '../../shared/study/schema';
import { openTestDatabase } from '../support/app';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

let db: DataSource;
let stack: TestStack;
let staff: string;
let physician: string;
let coder: string;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db, { attachments: { dir: '.data/test-attachments', maxBytes: 64 * 1024 } });
  staff = (await signIn(stack, usernameOf('staff'))).cookie;
  physician = (await signIn(stack, usernameOf('physician'))).cookie;
  coder = (await signIn(stack, usernameOf('coder'))).cookie;
});
afterAll(async () => {
  await stack.close();
  await db.destroy();
});

const api = () => request(stack.url);
const newPatient = () => ({ mrn: `M-${randomUUID().slice(0, 8)}`, familyName: 'Lindqvist', givenName: 'Oona', birthDate: '1966-08-09', sex: 'female' });

async function create(cookie = staff, extra: Record<string, unknown> = {}): Promise<StudyRecord> {
  const res = await api().post('/api/studies').set('Cookie', cookie).set('Origin', stack.url).send({ patient: newPatient(), ...extra }).expect(201);
  return res.body;
}

describe('POST /api/studies', () => {
  it('opens a draft for a new patient and records it', async () => {
    const res = await api()
      .post('/api/studies')
      .set('Cookie', staff)
      .set('Origin', stack.url)
      .send({ patient: newPatient(), details: { indication: 'Intermediate LAD lesion', clinicalQuestion: 'intermediate-lesion', guideFrench: 6 } })
      .expect(201);
    expect(res.headers.location).toBe(`/api/studies/${res.body.id}`);
    expect(res.body).toMatchObject({ state: 'draft', version: 1, details: { indication: 'Intermediate LAD lesion', guideFrench: 6, referringEmail: null }, vessels: [] });
    expect(res.body.accession).toMatch(/^ISB-\d{8}-\d{4}-[A-Z0-9]{4}$/);
    const [row] = await db.query(`SELECT action, outcome FROM audit_event WHERE entity_id = $1 AND action = 'create'`, [res.body.id]);
    expect(row).toMatchObject({ action: 'create', outcome: 'success' });
  });

  it('answers a bad body with field errors located by JSON pointers', async () => {
    const res = await api()
      .post('/api/studies')
      .set('Cookie', staff)
      .set('Origin', stack.url)
      .send({ patient: { ...newPatient(), birthDate: '1966-13-45', mrn: '' }, details: { guideFrench: 11, referringEmail: 'not-an-email' } })
      .expect(400);
    expect(res.headers['content-type']).toMatch(/problem\+json/);
    const pointers = res.body.errors.map((e: { pointer: string }) => e.pointer);
    expect(pointers).toEqual(expect.arrayContaining(['/patient/mrn', '/patient/birthDate', '/details/guideFrench', '/details/referringEmail']));
    expect(res.body.errors.find((e: { pointer: string }) => e.pointer === '/details/guideFrench').detail).toBe('Guide catheter size must be at most 8 French.');
  });

  it('is refused to a coder (403) and to no session (401)', async () => {
    await api().post('/api/studies').set('Cookie', coder).set('Origin', stack.url).send({ patient: newPatient() }).expect(403);
    await api().post('/api/studies').set('Origin', stack.url).send({ patient: newPatient() }).expect(401);
  });
});

describe('PATCH /api/studies/:id', () => {
  it('stores vessels with their injections in their own tables and raises the version', async () => {
    const study = await create();
    const vessel = { ...emptyVessel(randomUUID(), 'LAD'), segment: '6', restPa: 100, restPd: 95, hyperemiaPa: 90, hyperemiaPd: 72, restTransit: [0.9, 0.88, 0.92], hyperemiaTransit: [0.3, 0.31, 0.29] };
    const res = await api().patch(`/api/studies/${study.id}`).set('Cookie', staff).set('Origin', stack.url).send({ version: 1, vessels: [vessel] }).expect(200);
    expect(res.body.version).toBe(2);
    expect(res.body.vessels[0]).toMatchObject({ vessel: 'LAD', segment: '6', restPa: 100, hyperemiaTransit: [0.3, 0.31, 0.29] });
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM thermodilution_injection WHERE vessel_assessment_id = $1`, [vessel.id]);
    expect(n).toBe(6);
    const analysis = await api().get(`/api/studies/${study.id}/analysis`).set('Cookie', physician).expect(200);
    // Hand-computed from the published formula (FFR = Pd/Pa at hyperaemia, Pijls et al., NEJM 1996): FFR 72/90 = 0.80 (abnormal at ≤ 0.80, ESC 2024).
    expect(analysis.body.analysis.vessels[0].ffr).toBeCloseTo(0.8, 10);
    expect(analysis.body.analysis.vessels[0].ffrFlag).toBe('abnormal');
    expect(analysis.body.analysis.vessels[0].cfr).toBeCloseTo(0.9 / 0.3, 2);
  });

  it('refuses a stale version with 409 and the current record, and keeps the newer data', async () => {
    const study = await create();
    await api().patch(`/api/studies/${study.id}`).set('Cookie', staff).set('Origin', stack.url).send({ version: 1, findings: { ...emptyFindings(), complicationKinds: ['none'], contrastMl: 80, fluoroscopyMinutes: 6.5 } }).expect(200);
    const stale = await api().patch(`/api/studies/${study.id}`).set('Cookie', physician).set('Origin', stack.url).send({ version: 1, findings: { ...emptyFindings(), complications: 'Overwritten?', contrastMl: 1, fluoroscopyMinutes: 1 } }).expect(409);
    expect(stale.headers['content-type']).toMatch(/problem\+json/);
    expect(stale.body).toMatchObject({ status: 409, currentVersion: 2, current: { findings: { complicationKinds: ['none'], contrastMl: 80 } } });
    const now = await api().get(`/api/studies/${study.id}`).set('Cookie', staff).expect(200);
    expect(now.body.findings.complicationKinds).toEqual(['none']);
    expect(now.body.version).toBe(2);
  });

  it.each([
    ['a negative pressure', { vessels: [{ ...emptyVessel('7d5b6f1e-0a4c-4d3f-9b1e-2c3d4e5f6a7b', 'LAD'), restPa: -4 }] }, '/vessels/0/restPa'],
    ['a transit time above 10 s', { vessels: [{ ...emptyVessel('7d5b6f1e-0a4c-4d3f-9b1e-2c3d4e5f6a7b', 'RCA'), restTransit: [0.8, 12] }] }, '/vessels/0/restTransit/1'],
    ['an unknown vessel', { vessels: [{ ...emptyVessel('7d5b6f1e-0a4c-4d3f-9b1e-2c3d4e5f6a7b', 'LAD'), vessel: 'XYZ' }] }, '/vessels/0/vessel'],
    ['a constriction above 100%', { vasoreactivity: { ...emptyVasoreactivity(), doses: [{ ...emptyDose('6c1d2e3f-4a5b-4c6d-8e7f-9a0b1c2d3e4f', 'LAD'), micrograms: 20, constrictionPct: 140, symptoms: false, ischemicEcg: false }] } }, '/vasoreactivity/doses/0/constrictionPct'],
    ['a wedge pressure of 0 (the analysis needs a positive pressure)', { vessels: [{ ...emptyVessel('7d5b6f1e-0a4c-4d3f-9b1e-2c3d4e5f6a7b', 'LAD'), wedgePressure: 0 }] }, '/vessels/0/wedgePressure'],
    ['a pressure below the measurable floor', { vessels: [{ ...emptyVessel('7d5b6f1e-0a4c-4d3f-9b1e-2c3d4e5f6a7b', 'LAD'), restPa: 0.0005 }] }, '/vessels/0/restPa'],
    ['"none" together with a complication', { findings: { ...emptyFindings(), complicationKinds: ['none', 'dissection'] } }, '/findings/complicationKinds'],
    ['a segment code that does not exist', { vessels: [{ ...emptyVessel('7d5b6f1e-0a4c-4d3f-9b1e-2c3d4e5f6a7b', 'LAD'), segment: '18' }] }, '/vessels/0/segment'],
    ['no version', { version: undefined }, '/version'],
  ])('refuses %s with a field error at its pointer', async (_what, body, pointer) => {
    const study = await create();
    const res = await api().patch(`/api/studies/${study.id}`).set('Cookie', staff).set('Origin', stack.url).send({ version: 1, ...body }).expect(400);
    expect(res.body.errors.map((e: { pointer: string }) => e.pointer)).toContain(pointer);
  });

  it('refuses edits to a signed study', async () => {
    const study = await create();
    await db.query(`UPDATE study SET state = 'signed' WHERE id = $1`, [study.id]);
    const res = await api().patch(`/api/studies/${study.id}`).set('Cookie', physician).set('Origin', stack.url).send({ version: 1, findings: { ...emptyFindings(), impression: 'x' } }).expect(409);
    expect(res.body.title).toBe('The study is signed');
  });

  it('answers 404 for an unknown or malformed id', async () => {
    await api().get('/api/studies/00000000-0000-4000-8000-000000000000').set('Cookie', staff).expect(404);
    await api().get('/api/studies/not-a-uuid').set('Cookie', staff).expect(404);
  });
});

describe('GET /api/studies (worklist)', () => {
  it('pages by keyset without gaps or repeats, and filters by state and search', async () => {
    const family = `Zed${randomUUID().slice(0, 6)}`;
    const made: string[] = [];
    for (let i = 0; i < 7; i++) {
      const res = await api().post('/api/studies').set('Cookie', staff).set('Origin', stack.url).send({ patient: { ...newPatient(), familyName: family } }).expect(201);
      made.push(res.body.id);
    }
    const seen: string[] = [];
    let cursor: string | null = null;
    do {
      const res: { body: { items: { id: string }[]; nextCursor: string | null } } = await api().get("/api/studies").query({ q: family.toLowerCase().slice(0, 6), limit: 3, ...(cursor ? { cursor } : {}) }).set('Cookie', staff).expect(200);
      seen.push(...res.body.items.map((s: { id: string }) => s.id));
      cursor = res.body.nextCursor;
    } while (cursor);
    expect(new Set(seen).size).toBe(seen.length);
    expect(seen.sort()).toEqual([...made].sort());
    const signed = await api().get('/api/studies').query({ state: 'signed', q: family }).set('Cookie', staff).expect(200);
    expect(signed.body.items).toEqual([]);
  });

  it('finds a patient the ways people type them: as the list prints the name, given then family, part of the MRN, the MRN in lower case', async () => {
    const family = `Aster${randomUUID().slice(0, 6)}`;
    const given = `Ada${randomUUID().slice(0, 4)}`;
    const mrn = `MRN-${randomUUID().slice(0, 4).toUpperCase()}7731`;
    const res = await api().post('/api/studies').set('Cookie', staff).set('Origin', stack.url).send({ patient: { ...newPatient(), familyName: family, givenName: given, mrn } }).expect(201);
    const find = async (q: string) => (await api().get('/api/studies').query({ q }).set('Cookie', staff).expect(200)).body.items.map((s: { id: string }) => s.id);
    for (const q of [`${family.toUpperCase()}, ${given}`, `${family}, ${given.slice(0, 1)}.`, `${given} ${family}`, mrn.toLowerCase(), mrn.slice(0, 8), mrn.slice(-6)]) {
      expect({ q, found: await find(q) }).toEqual({ q, found: [res.body.id] });
    }
    // A wrong given name with the right family name finds nothing.
    expect(await find(`${family}, Zz`)).toEqual([]);
  });

  it('answers the search through index lookups, not a walk of the patients', async () => {
    const runner = db.createQueryRunner();
    let forced: { 'QUERY PLAN': string }[];
    try {
      // With sequential scans off the planner must still find an index for every arm (no Seq Scan left).
      await runner.query('SET enable_seqscan = off');
      forced = await runner.query(`EXPLAIN SELECT id FROM patient p WHERE p.mrn = 'x' OR upper(p.mrn) = 'X' OR upper(p.mrn) LIKE 'MRN-12%' OR reverse(upper(p.mrn)) LIKE '1377%' OR (lower(p.family_name) LIKE 'aster%' AND lower(p.given_name) LIKE 'a%') OR lower(p.given_name) LIKE 'ada%'`);
      await runner.query('RESET enable_seqscan');
    } finally {
      await runner.release();
    }
    expect(forced.map((r) => r['QUERY PLAN']).join('\n')).not.toMatch(/Seq Scan/);
  });

  it('refuses a forged cursor and a bad filter with a clear problem', async () => {
    const bad = await api().get('/api/studies').query({ cursor: 'bm9wZQ' }).set('Cookie', staff).expect(400);
    expect(bad.body.errors[0].pointer).toBe('/cursor');
    const state = await api().get('/api/studies').query({ state: 'finished' }).set('Cookie', staff).expect(400);
    expect(state.body.errors[0].pointer).toBe('/state');
  });
});

describe('attachments', () => {
  const pdf = Buffer.from('%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n');
  const png = Buffer.from('89504e470d0a1a0a0000000d4948445200000001000000010806000000', 'hex');
  const csv = Buffer.from('time_s,pa_mmHg,pd_mmHg\n0.00,92,88\n0.01,93,88\n');
  const elf = Buffer.concat([Buffer.from([0x7f, 0x45, 0x4c, 0x46, 2, 1, 1, 0]), Buffer.alloc(120, 1)]);

  it.each([
    ['printout.pdf', pdf, 'application/pdf'],
    ['trace.png', png, 'image/png'],
    ['pullback.csv', csv, 'text/csv'],
  ])('accepts %s, stores its SHA-256 and serves it back', async (name, bytes, type) => {
    const study = await create();
    const res = await api().post(`/api/studies/${study.id}/attachments`).set('Cookie', staff).set('Origin', stack.url).attach('file', bytes, name).expect(201);
    expect(res.body).toMatchObject({ fileName: name, mediaType: type, sizeBytes: bytes.length });
    expect(res.body.sha256).toBe((await import('node:crypto')).createHash('sha256').update(bytes).digest('hex'));
    const back = await api().get(`/api/attachments/${res.body.id}/content`).set('Cookie', physician).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    }).expect(200);
    expect(Buffer.compare(back.body as Buffer, bytes)).toBe(0);
    expect(back.headers['content-disposition']).toContain(name);
    const record = await api().get(`/api/studies/${study.id}`).set('Cookie', staff).expect(200);
    expect(record.body.attachments.map((a: { id: string }) => a.id)).toEqual([res.body.id]);
  });

  it('refuses an executable renamed to .pdf with 415, judged by content', async () => {
    const study = await create();
    const res = await api().post(`/api/studies/${study.id}/attachments`).set('Cookie', staff).set('Origin', stack.url).attach('file', elf, { filename: 'report.pdf', contentType: 'application/pdf' }).expect(415);
    expect(res.body.title).toBe('File type not accepted');
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM attachment WHERE study_id = $1`, [study.id]);
    expect(n).toBe(0);
  });

  it('refuses a file over the size limit with 413', async () => {
    const study = await create();
    const big = Buffer.concat([pdf, Buffer.alloc(70 * 1024, 0x20)]);
    const res = await api().post(`/api/studies/${study.id}/attachments`).set('Cookie', staff).set('Origin', stack.url).attach('file', big, 'big.pdf').expect(413);
    expect(res.body.title).toBe('File too large');
  });

  it('lets staff delete an attachment (audited) but not a coder', async () => {
    const study = await create();
    const up = await api().post(`/api/studies/${study.id}/attachments`).set('Cookie', staff).set('Origin', stack.url).attach('file', pdf, 'a.pdf').expect(201);
    await api().delete(`/api/attachments/${up.body.id}`).set('Cookie', coder).set('Origin', stack.url).expect(403);
    await api().delete(`/api/attachments/${up.body.id}`).set('Cookie', physician).set('Origin', stack.url).expect(204);
    await api().get(`/api/attachments/${up.body.id}/content`).set('Cookie', staff).expect(404);
    const [row] = await db.query(`SELECT actor_role, detail FROM audit_event WHERE action = 'delete' AND entity_id = $1`, [up.body.id]);
    expect(row).toMatchObject({ actor_role: 'physician', detail: { fileName: 'a.pdf', sha256: up.body.sha256 } });
  });
});

describe('patient identity is never rewritten from a study', () => {
  it('links a new study to the patient on file when the demographics agree, and refuses when they do not', async () => {
    const first = await create();
    const again = await api().post('/api/studies').set('Cookie', staff).set('Origin', stack.url).send({ patient: { ...first.patient, familyName: first.patient.familyName.toUpperCase() } }).expect(201);
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM patient WHERE mrn = $1`, [first.patient.mrn]);
    expect(n).toBe(1);
    expect(again.body.patient.familyName).toBe(first.patient.familyName);
    const clash = await api().post('/api/studies').set('Cookie', staff).set('Origin', stack.url).send({ patient: { ...first.patient, givenName: 'Someone Else' } }).expect(409);
    expect(clash.body.errors[0].pointer).toBe('/patient/mrn');
    const [row] = await db.query(`SELECT given_name FROM patient WHERE mrn = $1`, [first.patient.mrn]);
    expect(row.given_name).toBe(first.patient.givenName);
  });

  it('corrects a mistyped MRN in place (no stray patients), and never moves a study onto another patient', async () => {
    const other = await create();
    const study = await create();
    let version = study.version;
    // Autosave sends each pause in typing: 'X', 'X9', … — each corrects the same patient row.
    for (const mrn of ['Q', 'Q9', 'Q98', `Q987-${randomUUID().slice(0, 4)}`]) {
      const res = await api().patch(`/api/studies/${study.id}`).set('Cookie', staff).set('Origin', stack.url).send({ version, patient: { ...study.patient, mrn } }).expect(200);
      version = res.body.version;
    }
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM patient WHERE mrn IN ('Q', 'Q9', 'Q98') OR mrn = $1`, [study.patient.mrn]);
    expect(n).toBe(0);
    // Typing someone else's MRN with this patient's name is refused as a field error.
    const clash = await api().patch(`/api/studies/${study.id}`).set('Cookie', staff).set('Origin', stack.url).send({ version, patient: { ...study.patient, mrn: other.patient.mrn, givenName: 'Different' } }).expect(409);
    expect(clash.body).toMatchObject({ title: 'The MRN belongs to another patient', errors: [{ pointer: '/patient/mrn' }] });
    const [otherRow] = await db.query(`SELECT given_name FROM patient WHERE mrn = $1`, [other.patient.mrn]);
    expect(otherRow.given_name).toBe(other.patient.givenName);
  });

  it('refuses to rename a patient who has other studies', async () => {
    const first = await create();
    const second = await api().post('/api/studies').set('Cookie', staff).set('Origin', stack.url).send({ patient: first.patient }).expect(201);
    const res = await api().patch(`/api/studies/${second.body.id}`).set('Cookie', staff).set('Origin', stack.url).send({ version: 1, patient: { ...first.patient, familyName: 'Renamed' } }).expect(409);
    expect(res.body.title).toBe('The patient has other studies');
  });
});

describe('write integrity', () => {
  it('returns exactly the version it wrote', async () => {
    const study = await create();
    const res = await api().patch(`/api/studies/${study.id}`).set('Cookie', staff).set('Origin', stack.url).send({ version: 1, setup: { ...study.setup, heparinUnits: 5000 } }).expect(200);
    expect(res.body.version).toBe(2);
    expect(res.body.setup.heparinUnits).toBe(5000);
  });

  it('lets exactly one of two concurrent writes at the same version through', async () => {
    const study = await create();
    const send = (contrastMl: number) =>
      api().patch(`/api/studies/${study.id}`).set('Cookie', staff).set('Origin', stack.url).send({ version: 1, findings: { ...study.findings, contrastMl } });
    const results = await Promise.all([send(10), send(20), send(30)]);
    expect(results.map((r) => r.status).sort()).toEqual([200, 409, 409]);
    const [row] = await db.query(`SELECT version, contrast_ml::float8 AS c FROM study WHERE id = $1`, [study.id]);
    expect(row.version).toBe(2);
    expect(results.find((r) => r.status === 200)!.body.findings.contrastMl).toBe(row.c);
  });

  it('refuses attachments to be added or removed on a signed study', async () => {
    const study = await create();
    const up = await api().post(`/api/studies/${study.id}/attachments`).set('Cookie', staff).set('Origin', stack.url).attach('file', Buffer.from('%PDF-1.4\n%%EOF\n'), 'x.pdf').expect(201);
    await db.query(`UPDATE study SET state = 'signed' WHERE id = $1`, [study.id]);
    await api().post(`/api/studies/${study.id}/attachments`).set('Cookie', staff).set('Origin', stack.url).attach('file', Buffer.from('%PDF-1.4\n%%EOF\n'), 'y.pdf').expect(409);
    await api().delete(`/api/attachments/${up.body.id}`).set('Cookie', staff).set('Origin', stack.url).expect(409);
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM attachment WHERE study_id = $1`, [study.id]);
    expect(n).toBe(1);
  });

  it('refuses text renamed to .pdf (content and name disagree)', async () => {
    const study = await create();
    const res = await api().post(`/api/studies/${study.id}/attachments`).set('Cookie', staff).set('Origin', stack.url).attach('file', Buffer.from('a,b\n1,2\n3,4\n'), 'report.pdf').expect(415);
    expect(res.body.detail).toMatch(/named as another kind of file/);
  });
});

describe('worklist edge cases', () => {
  it('answers a cursor with a forged timestamp with 400, not a server error', async () => {
    const forged = Buffer.from(JSON.stringify(['yesterday', '00000000-0000-4000-8000-000000000000'])).toString('base64url');
    await api().get('/api/studies').query({ cursor: forged }).set('Cookie', staff).expect(400);
  });

  it('filters by instants, so the lab decides where its day starts', async () => {
    const study = await create(staff, { details: { procedureStartedAt: '2026-03-04T23:30:00.000Z' } });
    const inDay = await api().get('/api/studies').query({ from: '2026-03-04T23:00:00.000Z', to: '2026-03-05T23:00:00.000Z', q: study.patient.mrn }).set('Cookie', staff).expect(200);
    expect(inDay.body.items.map((s: { id: string }) => s.id)).toEqual([study.id]);
    const dayBefore = await api().get('/api/studies').query({ from: '2026-03-03T23:00:00.000Z', to: '2026-03-04T23:00:00.000Z', q: study.patient.mrn }).set('Cookie', staff).expect(200);
    expect(dayBefore.body.items).toEqual([]);
  });
});

describe('patient identity under concurrency and corrections', () => {
  it('stores a case-only name correction exactly, for a patient with only this study', async () => {
    const study = await create();
    await api().patch(`/api/studies/${study.id}`).set('Cookie', staff).set('Origin', stack.url).send({ version: 1, patient: { ...study.patient, familyName: study.patient.familyName.toUpperCase() } }).expect(200);
    const [row] = await db.query(`SELECT family_name FROM patient WHERE mrn = $1`, [study.patient.mrn]);
    expect(row.family_name).toBe(study.patient.familyName.toUpperCase());
  });

  it('opens every study when several arrive at once for the same new MRN, under one patient', async () => {
    const patient = newPatient();
    const results = await Promise.all([1, 2, 3].map(() => api().post('/api/studies').set('Cookie', staff).set('Origin', stack.url).send({ patient })));
    expect(results.map((r) => r.status)).toEqual([201, 201, 201]);
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM patient WHERE mrn = $1`, [patient.mrn]);
    expect(n).toBe(1);
  });

  it('removes the patient a study leaves behind when it had no other study', async () => {
    const target = await create();
    const study = await create();
    const [{ id: leftId }] = await db.query(`SELECT patient_id AS id FROM study WHERE id = $1`, [study.id]);
    await api().patch(`/api/studies/${study.id}`).set('Cookie', staff).set('Origin', stack.url).send({ version: 1, patient: target.patient }).expect(200);
    const rows = await db.query(`SELECT id FROM patient WHERE id = $1`, [leftId]);
    expect(rows).toEqual([]);
    const [moved] = await db.query(`SELECT p.mrn FROM study s JOIN patient p ON p.id = s.patient_id WHERE s.id = $1`, [study.id]);
    expect(moved.mrn).toBe(target.patient.mrn);
  });

  it('names the field that differs when a shared patient would be renamed', async () => {
    const first = await create();
    const second = await api().post('/api/studies').set('Cookie', staff).set('Origin', stack.url).send({ patient: first.patient }).expect(201);
    const res = await api().patch(`/api/studies/${second.body.id}`).set('Cookie', staff).set('Origin', stack.url).send({ version: 1, patient: { ...first.patient, birthDate: '1966-08-10' } }).expect(409);
    expect(res.body.errors).toEqual([{ pointer: '/patient/birthDate', detail: expect.stringContaining('birth date') }]);
  });
});

describe('worklist order', () => {
  it('gives each item the key it is ordered by: procedure start, else when the record was opened', async () => {
    const scheduled = await create(staff, { details: { procedureStartedAt: '2026-02-03T08:00:00.000Z' } });
    const unscheduled = await create();
    const page = await api().get('/api/studies').query({ q: scheduled.patient.mrn }).set('Cookie', staff).expect(200);
    expect(page.body.items[0].sortAt).toBe('2026-02-03T08:00:00.000Z');
    const other = await api().get('/api/studies').query({ q: unscheduled.patient.mrn }).set('Cookie', staff).expect(200);
    expect(other.body.items[0].sortAt).toBe(unscheduled.createdAt);
  });
});
