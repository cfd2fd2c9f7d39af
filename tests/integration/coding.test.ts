import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { CODING_CAUTION, suggestCodes, toCodingInput } from '../../shared/coding';
import type { ReviewView } from '../../shared/coding/review';
import { analyzeStudy } from '../../shared/physiology';
import { emptyStudyCoding, emptyVessel, type StudyRecord, type StudySections } from '../../shared/study/schema';
import { toPhysiologyInput } from '../../shared/study/to-physiology';
import { openTestDatabase } from '../support/app';
import { insertReportVersion, runSuggestCodes } from '../support/coding';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

/*
 * Sources of the codes checked here:
 * - 93458: coronary angiography with left heart catheterization (CPT descriptors 93454–93461) [memory, well known];
 * - 93571 / 93572: intravascular coronary physiology, first vessel / each additional vessel (CPT add-on codes) [memory, well known];
 * - modifier 26: professional component, for the physician's claim of work done in a hospital (CMS PC/TC indicator) [memory];
 * - 92928: stent placement in one major coronary artery (CPT 92928) [memory, well known].
 */

let db: DataSource;
let stack: TestStack;
let staff: string;
let physician: string;
let coder: string;
let chief: string;
let physicianId: string;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
  staff = (await signIn(stack, usernameOf('staff'))).cookie;
  physician = (await signIn(stack, usernameOf('physician'))).cookie;
  coder = (await signIn(stack, usernameOf('coder'))).cookie;
  chief = (await signIn(stack, usernameOf('chief'))).cookie;
  [{ id: physicianId }] = await db.query(`SELECT id FROM app_user WHERE role = 'physician' ORDER BY created_at LIMIT 1`);
});
afterAll(async () => {
  await stack.close();
  await db.destroy();
});

const api = () => request(stack.url);
const post = (path: string, cookie: string, body: unknown) => api().post(path).set('Cookie', cookie).set('Origin', stack.url).send(body as object);

/** Intermediate LAD lesion with a low FFR, a resting ratio in the circumflex, after angiography with left heart catheterization. */
function sections(coding: Partial<StudySections['coding']> = {}): Partial<StudySections> {
  const lad = { ...emptyVessel(randomUUID(), 'LAD'), restPa: 92, restPd: 80, hyperemiaPa: 88, hyperemiaPd: 66 };
  const lcx = { ...emptyVessel(randomUUID(), 'LCX'), nhprKind: 'whole-cycle' as const, nhprValue: 0.95 };
  return {
    details: {
      encounter: null, procedureStartedAt: '2025-03-11T09:00:00.000Z', procedureEndedAt: '2025-03-11T10:00:00.000Z', operatorId: null, referringName: null,
      referringEmail: null, indication: 'Intermediate LAD lesion', clinicalQuestion: 'intermediate-lesion', accessSite: null, weightKg: null, heightCm: null,
      anginaPresent: true, anginaCharacter: null, guideFrench: 6,
    },
    setup: {
      transducerZeroed: true, nitratesGiven: true, nitrateTiming: null, nitrateDoseMicrograms: 200, equalizedInAorta: true, introducerRemoved: true,
      wirePosition: null, hyperemicAgent: 'adenosine', hyperemicRoute: null, hyperemicDose: null, hyperemicDoseUnit: null, heparinUnits: null,
      baselineHeartRate: null, baselineSystolic: null, baselineDiastolic: null, baselineRhythm: null, lvedp: null,
    },
    vessels: [lad, lcx],
    coding: {
      ...emptyStudyCoding(),
      patientClass: 'outpatient',
      billing: 'professional',
      setting: 'hospital',
      diagnosticCath: 'done',
      coronaryAngiography: true,
      leftHeart: true,
      ...coding,
    },
  };
}

/** A study written through the API, as the lab would, then read back whole. */
async function recordedStudy(patch: Partial<StudySections>): Promise<StudyRecord> {
  const created = await post('/api/studies', staff, { patient: { mrn: `C-${randomUUID().slice(0, 8)}`, familyName: 'Halloran', givenName: 'Bea', birthDate: '1958-02-14', sex: 'female' } }).expect(201);
  const res = await api().patch(`/api/studies/${created.body.id}`).set('Cookie', staff).set('Origin', stack.url).send({ version: created.body.version, ...patch }).expect(200);
  await db.query(`UPDATE study SET operator_id = $2 WHERE id = $1`, [created.body.id, physicianId]);
  return res.body as StudyRecord;
}

async function signedStudy(patch = sections()): Promise<{ record: StudyRecord; versionId: string }> {
  const record = await recordedStudy(patch);
  const versionId = await insertReportVersion(db, record, { signedBy: physicianId });
  await runSuggestCodes(versionId);
  return { record, versionId };
}

const review = async (id: string, cookie = coder): Promise<ReviewView> => (await api().get(`/api/coding/studies/${id}`).set('Cookie', cookie).expect(200)).body;
const line = (r: ReviewView, code: string) => r.lines.find((l) => l.code === code)!;

describe('the study records its coding section', () => {
  it('stores the encounter, the catheterization and the interventions, and reads them back', async () => {
    const lesion = randomUUID();
    const record = await recordedStudy(sections({ interventions: [{ id: lesion, vessel: 'LAD', kind: 'stent', branch: false, stent: 'drug-eluting' }], angina: true }));
    expect(record.coding).toEqual({
      patientClass: 'outpatient', billing: 'professional', setting: 'hospital', diagnosticCath: 'done', coronaryAngiography: true, leftHeart: true,
      leftVentriculography: false, rightHeart: false, graftAngiography: false, angina: true,
      interventions: [{ id: lesion, vessel: 'LAD', kind: 'stent', branch: false, stent: 'drug-eluting' }],
    });
    const [row] = await db.query(`SELECT coding_patient_class, diagnostic_cath, cath_left_heart FROM study WHERE id = $1`, [record.id]);
    expect(row).toEqual({ coding_patient_class: 'outpatient', diagnostic_cath: 'done', cath_left_heart: true });
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM coronary_intervention WHERE study_id = $1`, [record.id]);
    expect(n).toBe(1);
  });

  it('starts with nothing recorded and refuses a value outside the lists, at its field', async () => {
    const created = await post('/api/studies', staff, { patient: { mrn: `C-${randomUUID().slice(0, 8)}`, familyName: 'Okafor', givenName: 'Ruth', birthDate: '1970-01-01', sex: 'female' } }).expect(201);
    expect(created.body.coding).toEqual(emptyStudyCoding());
    const res = await api()
      .patch(`/api/studies/${created.body.id}`)
      .set('Cookie', staff)
      .set('Origin', stack.url)
      .send({ version: created.body.version, coding: { ...emptyStudyCoding(), patientClass: 'emergency' } })
      .expect(400);
    expect(res.body.errors.map((e: { pointer: string }) => e.pointer)).toContain('/coding/patientClass');
  });
});

describe('suggest-codes for a signed report version', () => {
  it('stores exactly what the engine suggests for the signed record, and queues the study', async () => {
    const { record, versionId } = await signedStudy();
    const expected = suggestCodes(toCodingInput(record, analyzeStudy(toPhysiologyInput(record))));
    const stored = await db.query(
      `SELECT l.system, l.code, l.units, l.modifiers, l.rule_id FROM code_line l JOIN code_suggestion_set s ON s.id = l.set_id WHERE s.report_version_id = $1 ORDER BY l.position`,
      [versionId],
    );
    expect(stored).toEqual(expected.codes.map((c) => ({ system: c.system, code: c.code, units: c.units, modifiers: c.modifiers, rule_id: c.ruleId })));
    const cpt = stored.filter((c: { system: string }) => c.system === 'CPT').map((c: { code: string; modifiers: string[] }) => `${c.code}-${c.modifiers.join('-')}`);
    // Angiography with left heart catheterization; physiology in two vessels; professional claim in a hospital (sources above).
    expect(cpt).toEqual(expect.arrayContaining(['93458-26', '93571-26', '93572-26']));
    const [reviewRow] = await db.query(`SELECT status FROM coding_review WHERE study_id = $1`, [record.id]);
    expect(reviewRow.status).toBe('to-code');
    const [audit] = await db.query(`SELECT outcome, detail FROM audit_event WHERE entity_type = 'code-suggestions' AND entity_id = $1`, [record.id]);
    expect(audit).toMatchObject({ outcome: 'success', detail: { reportVersionId: versionId, versionNo: 1, queued: true } });
  });

  it('leaves a version that already has its suggestions alone when the job runs again', async () => {
    const { record, versionId } = await signedStudy();
    const logged = await runSuggestCodes(versionId);
    expect(logged[0]).toMatch(/already has its code suggestions/);
    const [{ sets }] = await db.query(`SELECT count(*)::int AS sets FROM code_suggestion_set WHERE study_id = $1`, [record.id]);
    expect(sets).toBe(1);
  });

  it('takes the date of service in the lab\'s time zone: a New Year\'s Eve evening in Chicago is coded with that year\'s CPT release — CPT releases take effect 1 January (AMA)', async () => {
    const [{ time_zone: before }] = await db.query(`SELECT time_zone FROM lab_settings WHERE id = 1`);
    await db.query(`UPDATE lab_settings SET time_zone = 'America/Chicago' WHERE id = 1`);
    try {
      const base = sections();
      // 21:00 on 31 December 2024 in Chicago is 03:00 UTC on 1 January 2025.
      const { record, versionId } = await signedStudy({ ...base, details: { ...base.details!, procedureStartedAt: '2025-01-01T03:00:00.000Z', procedureEndedAt: '2025-01-01T04:00:00.000Z' } });
      const [set] = await db.query(`SELECT input->>'dateOfService' AS day, code_sets->'CPT'->>'label' AS cpt FROM code_suggestion_set WHERE report_version_id = $1`, [versionId]);
      expect(set).toEqual({ day: '2024-12-31', cpt: 'CPT 2024' });
      const [line93458] = await db.query(`SELECT l.code_set FROM code_line l JOIN code_suggestion_set s ON s.id = l.set_id WHERE s.report_version_id = $1 AND l.code = '93458'`, [versionId]);
      expect(line93458.code_set).toBe('CPT 2024');
      expect(record.details.procedureStartedAt).toBe('2025-01-01T03:00:00.000Z');
    } finally {
      await db.query(`UPDATE lab_settings SET time_zone = $1 WHERE id = 1`, [before]);
    }
  });

  it('reads a version signed before the coding section existed as nothing recorded: blocking warnings', async () => {
    const record = await recordedStudy(sections());
    const { coding: _none, ...older } = record;
    const versionId = await insertReportVersion(db, older as StudyRecord, { signedBy: physicianId });
    await runSuggestCodes(versionId);
    const r = await review(record.id);
    expect(r.set.warnings.filter((w) => w.blocking).map((w) => w.code)).toEqual(expect.arrayContaining(['encounter-not-recorded', 'cath-not-recorded']));
    expect(r.lines.some((l) => l.code === '93458')).toBe(false);
  });
});

describe('the coding queue and a study review', () => {
  it('lists studies to code oldest first, with age, and filters by physician and signing day', async () => {
    const older = await recordedStudy(sections());
    const newer = await recordedStudy(sections());
    await runSuggestCodes(await insertReportVersion(db, newer, { signedBy: physicianId, signedAt: new Date(Date.now() - 2 * 36e5) }));
    await runSuggestCodes(await insertReportVersion(db, older, { signedBy: physicianId, signedAt: new Date(Date.now() - 30 * 36e5) }));
    const res = await api().get('/api/coding/queue').set('Cookie', coder).expect(200);
    const ids = res.body.items.map((i: { studyId: string }) => i.studyId);
    expect(ids.indexOf(older.id)).toBeGreaterThanOrEqual(0);
    expect(ids.indexOf(older.id)).toBeLessThan(ids.indexOf(newer.id));
    const olderItem = res.body.items.find((i: { studyId: string }) => i.studyId === older.id);
    expect(olderItem).toMatchObject({ status: 'to-code', versionNo: 1, hoursWaiting: 30, operatorName: expect.any(String) });
    expect(olderItem.codeCount).toBeGreaterThan(0);

    const today = new Date().toISOString().slice(0, 10);
    const byDay = await api().get(`/api/coding/queue?operatorId=${physicianId}&from=${today}&to=${today}`).set('Cookie', coder).expect(200);
    const dayIds = byDay.body.items.map((i: { studyId: string }) => i.studyId);
    expect(dayIds).not.toContain(older.id); // signed 30 hours ago: another day
    expect(dayIds).toContain(newer.id);
    const nobody = await api().get(`/api/coding/queue?operatorId=${randomUUID()}`).set('Cookie', coder).expect(200);
    expect(nobody.body.items).toEqual([]);
    await api().get('/api/coding/queue?from=yesterday').set('Cookie', coder).expect(400);
  });

  it('shows each suggestion with its rule, reason and the caution, and the signed report beside them', async () => {
    const { record } = await signedStudy();
    const r = await review(record.id);
    expect(r.status).toBe('to-code');
    expect(r.set.caution).toBe(CODING_CAUTION);
    expect(r.report).toMatchObject({ versionNo: 1, status: 'final', narrativeText: expect.stringContaining(record.accession) });
    for (const l of r.lines) {
      expect(l.ruleId).toBeTruthy();
      expect(l.rationale!.length).toBeGreaterThan(10);
      expect(l.decision).toBeNull();
    }
    expect(r.blockers).toEqual([`${r.lines.length} suggested codes have no decision yet: accept, edit or reject each.`]);
    const [audit] = await db.query(`SELECT detail FROM audit_event WHERE action = 'read' AND entity_id = $1 ORDER BY id DESC LIMIT 1`, [record.id]);
    expect(audit.detail).toEqual({ view: 'coding' });
  });

  it('lets only coders decide: a physician and the chief are refused, the chief may read', async () => {
    const { record } = await signedStudy();
    const r = await review(record.id, chief);
    const body = { decision: 'accept', setId: r.set.id, lineId: r.lines[0].id };
    await post(`/api/coding/studies/${record.id}/decisions`, physician, body).expect(403);
    await post(`/api/coding/studies/${record.id}/decisions`, chief, body).expect(403);
    await api().get(`/api/coding/studies/${record.id}`).set('Cookie', physician).expect(403);
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM code_decision d JOIN code_line l ON l.id = d.line_id WHERE l.set_id = $1`, [r.set.id]);
    expect(n).toBe(0);
  });

  it('records accept, edit with a reason, reject with a reason and an added code, keeps the suggestion, and completes', async () => {
    const { record } = await signedStudy();
    let r = await review(record.id);
    const setId = r.set.id;
    const decide = (body: Record<string, unknown>) => post(`/api/coding/studies/${record.id}/decisions`, coder, { setId, ...body });

    await post(`/api/coding/studies/${record.id}/complete`, coder, { setId }).expect(409);

    r = (await decide({ decision: 'accept', lineId: line(r, '93458').id }).expect(200)).body;
    expect(r.status).toBe('in-review');
    expect(line(r, '93458')).toMatchObject({ decision: { decision: 'accept', reason: null }, final: { code: '93458', modifiers: ['26'], units: 1 } });

    // Edit: the format is checked against the line's system (CPT: five digits), and a reason is required.
    const bad = await decide({ decision: 'edit', lineId: line(r, '93572').id, code: '9357', units: 1, modifiers: ['26'], reason: 'Second vessel was a branch' }).expect(400);
    expect(bad.body.errors.map((e: { pointer: string }) => e.pointer)).toEqual(['/code']);
    const noReason = await decide({ decision: 'edit', lineId: line(r, '93572').id, code: '93572', units: 1, modifiers: ['26', 'XU'] }).expect(400);
    expect(noReason.body.errors.map((e: { pointer: string }) => e.pointer)).toEqual(['/reason']);
    r = (await decide({ decision: 'edit', lineId: line(r, '93572').id, code: '93572', units: 1, modifiers: ['26', 'XU'], reason: 'Separate vessel documented in the report' }).expect(200)).body;
    expect(line(r, '93572').final).toEqual({ system: 'CPT', code: '93572', units: 1, modifiers: ['26', 'XU'] });

    await decide({ decision: 'reject', lineId: line(r, '93571').id }).expect(400);
    r = (await decide({ decision: 'reject', lineId: line(r, '93571').id, reason: 'Physiology billed on another claim' }).expect(200)).body;
    expect(line(r, '93571')).toMatchObject({ final: null, decision: { decision: 'reject', reason: 'Physiology billed on another claim' } });

    // Added code: any system, format checked (ICD-10-CM: letter, digit, letter or digit, then a point and more).
    const badAdd = await post(`/api/coding/studies/${record.id}/codes`, coder, { setId, system: 'ICD-10-CM', code: 'Z955', units: 1, modifiers: [], reason: 'Prior stent' }).expect(400);
    expect(badAdd.body.errors.map((e: { pointer: string }) => e.pointer)).toEqual(['/code']);
    r = (await post(`/api/coding/studies/${record.id}/codes`, coder, { setId, system: 'ICD-10-CM', code: 'z95.5', units: 1, modifiers: [], reason: 'Prior coronary stent documented' }).expect(201)).body;
    expect(r.lines.at(-1)).toMatchObject({ origin: 'added', system: 'ICD-10-CM', code: 'Z95.5', ruleId: null, final: { code: 'Z95.5' }, decision: { decision: 'add' } });

    for (const l of r.lines.filter((x) => !x.decision)) r = (await decide({ decision: 'accept', lineId: l.id }).expect(200)).body;
    expect(r.blockers).toEqual([]);
    r = (await post(`/api/coding/studies/${record.id}/complete`, coder, { setId }).expect(200)).body;
    expect(r).toMatchObject({ status: 'coded', completedBy: expect.any(String), completedAt: expect.any(String) });

    // The suggestion itself is unchanged; the decisions are rows of their own; the study left the queue.
    const [original] = await db.query(`SELECT code, modifiers FROM code_line WHERE id = $1`, [line(r, '93572').id]);
    expect(original).toEqual({ code: '93572', modifiers: ['26'] });
    await expect(db.query(`UPDATE code_line SET code = '00000' WHERE id = $1`, [line(r, '93572').id])).rejects.toThrow(/append-only|permission denied/);
    const queue = await api().get('/api/coding/queue').set('Cookie', coder).expect(200);
    expect(queue.body.items.map((i: { studyId: string }) => i.studyId)).not.toContain(record.id);
    const coded = await api().get('/api/coding/queue?status=coded').set('Cookie', coder).expect(200);
    expect(coded.body.items.map((i: { studyId: string }) => i.studyId)).toContain(record.id);
    await decide({ decision: 'accept', lineId: line(r, '93571').id }).expect(409);

    // The export holds the codes as reported: accepted, edited and added; not the rejected one.
    const today = new Date().toISOString().slice(0, 10);
    const exported = await api().get(`/api/coding/export?from=${today}&to=${today}&format=json`).set('Cookie', chief).expect(200);
    const mine = exported.body.items.filter((c: { accession: string }) => c.accession === record.accession);
    expect(mine.map((c: { system: string; code: string; modifiers: string[]; units: number; decision: string }) => `${c.system} ${c.code} ${c.modifiers.join('-')} x${c.units} ${c.decision}`).sort()).toEqual(
      r.lines.filter((l) => l.final).map((l) => `${l.system} ${l.final!.code} ${l.final!.modifiers.join('-')} x${l.final!.units} ${l.decision!.decision}`).sort(),
    );
    expect(mine.some((c: { code: string; modifiers: string[] }) => c.code === '93571')).toBe(false);
    expect(mine.find((c: { code: string }) => c.code === '93572')).toMatchObject({ modifiers: ['26', 'XU'], reason: 'Separate vessel documented in the report' });

    const audit = await db.query(`SELECT action, detail FROM audit_event WHERE entity_type = 'study-coding' AND entity_id = $1 ORDER BY id`, [record.id]);
    expect(audit.map((a: { detail: { decision?: string; completed?: boolean } }) => a.detail.decision ?? (a.detail.completed ? 'complete' : '?'))).toEqual([
      'accept',
      'edit',
      'reject',
      'add',
      ...r.lines.filter((l) => l.decision?.decision === 'accept' && l.code !== '93458').map(() => 'accept'),
      'complete',
    ]);
  });

  it.each([
    // CPT Category I: five digits (AMA CPT code structure); 93463 is the drug-with-haemodynamics code [memory].
    { system: 'CPT', good: '93463', modifiers: ['26'], bad: '9346' },
    // HCPCS Level II: a letter and four digits (CMS HCPCS Level II code structure); C9600 drug-eluting stent [memory].
    { system: 'HCPCS', good: 'C9600', modifiers: ['LD'], bad: 'C96000' },
    // ICD-10-CM: letter, digit, letter or digit, then a point and up to four more (CMS ICD-10-CM conventions); Z95.5 coronary stent present [memory].
    { system: 'ICD-10-CM', good: 'Z95.5', modifiers: [], bad: 'Z9' },
    // ICD-10-PCS: seven characters without I or O (CMS ICD-10-PCS conventions); 4A033BC coronary pressure measurement [memory — check against the CMS PCS tables].
    { system: 'ICD-10-PCS', good: '4A033BC', modifiers: [], bad: '4A033IC' },
  ] as const)('adds a missed $system code, checked against its system\'s format with a message naming it', async ({ system, good, modifiers, bad }) => {
    const { record } = await signedStudy();
    const r = await review(record.id);
    const refused = await post(`/api/coding/studies/${record.id}/codes`, coder, { setId: r.set.id, system, code: bad, units: 1, modifiers, reason: 'Missed by the suggestions' }).expect(400);
    expect(refused.body.errors).toEqual([{ pointer: '/code', detail: expect.stringContaining(`${system} codes are`) }]);
    const added = (await post(`/api/coding/studies/${record.id}/codes`, coder, { setId: r.set.id, system, code: good, units: 1, modifiers, reason: 'Missed by the suggestions' }).expect(201)).body as ReviewView;
    expect(added.lines.at(-1)).toMatchObject({ origin: 'added', system, code: good, modifiers, final: { system, code: good, units: 1, modifiers }, decision: { decision: 'add' } });
    // A physician cannot add one.
    await post(`/api/coding/studies/${record.id}/codes`, physician, { setId: r.set.id, system, code: good, units: 1, modifiers, reason: 'Missed by the suggestions' }).expect(403);
  });

  it('refuses a decision on a code set that is not this study\'s without saying the report was amended', async () => {
    const { record } = await signedStudy();
    const other = await signedStudy();
    const r = await review(record.id);
    const theirs = await review(other.record.id);
    for (const setId of [randomUUID(), theirs.set.id]) {
      const res = await post(`/api/coding/studies/${record.id}/decisions`, coder, { setId, decision: 'accept', lineId: r.lines[0].id }).expect(409);
      expect(res.body.type).toMatch(/not-current-set$/);
      expect(res.body.detail).toMatch(/not this study's current code set/);
      expect(res.body.detail).not.toMatch(/amended/);
    }
  });

  it('refuses to complete while a blocking warning stands, even with every code decided', async () => {
    const { record } = await signedStudy(sections({ patientClass: null }));
    let r = await review(record.id);
    expect(r.set.warnings.some((w) => w.code === 'encounter-not-recorded' && w.blocking)).toBe(true);
    for (const l of r.lines) r = (await post(`/api/coding/studies/${record.id}/decisions`, coder, { setId: r.set.id, decision: 'accept', lineId: l.id }).expect(200)).body;
    const res = await post(`/api/coding/studies/${record.id}/complete`, coder, { setId: r.set.id }).expect(409);
    expect(res.body.detail).toMatch(/not recorded/i);
  });
});

describe('an addendum', () => {
  async function codedStudy() {
    const { record, versionId } = await signedStudy();
    let r = await review(record.id);
    for (const l of r.lines) r = (await post(`/api/coding/studies/${record.id}/decisions`, coder, { setId: r.set.id, decision: 'accept', lineId: l.id }).expect(200)).body;
    await post(`/api/coding/studies/${record.id}/complete`, coder, { setId: r.set.id }).expect(200);
    return { record, versionId, first: r };
  }

  async function amend(record: StudyRecord, versionId: string, patch: Partial<StudySections>) {
    await db.query(`UPDATE study SET state = 'amending' WHERE id = $1`, [record.id]);
    const current = (await api().get(`/api/studies/${record.id}`).set('Cookie', staff).expect(200)).body;
    const amended = (await api().patch(`/api/studies/${record.id}`).set('Cookie', staff).set('Origin', stack.url).send({ version: current.version, ...patch }).expect(200)).body;
    const second = await insertReportVersion(db, amended, { signedBy: physicianId, versionNo: 2, supersedesId: versionId, reason: 'Intervention added' });
    await runSuggestCodes(second);
    return amended as StudyRecord;
  }

  it('that changes what coding depends on puts the study back on the queue, with the changes against the decided codes', async () => {
    const { record, versionId, first } = await codedStudy();
    await amend(record, versionId, { coding: { ...record.coding, interventions: [{ id: randomUUID(), vessel: 'LAD', kind: 'stent', branch: false, stent: 'drug-eluting' }] } });
    const r = await review(record.id);
    expect(r).toMatchObject({ status: 'to-code', set: { versionNo: 2 }, report: { versionNo: 2, status: 'amended', reason: 'Intervention added' }, completedAt: null });
    expect(r.changes!.previousVersionNo).toBe(1);
    expect(r.changes!.inputChanges).toEqual(['interventions']);
    expect(r.changes!.codes).toContainEqual(expect.objectContaining({ kind: 'new', system: 'CPT', code: '92928' }));
    expect(r.changes!.codes).toContainEqual(expect.objectContaining({ kind: 'unchanged', code: '93458' }));
    // A decision sent for the first version's set is refused: the coder must look at the new one.
    const stale = await post(`/api/coding/studies/${record.id}/decisions`, coder, { setId: first.set.id, decision: 'accept', lineId: first.lines[0].id }).expect(409);
    expect(stale.body.type).toMatch(/suggestions-superseded/);
    const queue = await api().get('/api/coding/queue').set('Cookie', coder).expect(200);
    expect(queue.body.items.find((i: { studyId: string }) => i.studyId === record.id)).toMatchObject({ versionNo: 2, status: 'to-code' });
  });

  it('that leaves what coding depends on as it was keeps the completed review', async () => {
    const { record, versionId, first } = await codedStudy();
    await amend(record, versionId, { findings: { ...record.findings, impression: 'Corrected a typing error in the impression.' } });
    const r = await review(record.id);
    expect(r).toMatchObject({ status: 'coded', set: { id: first.set.id, versionNo: 1 } });
    const [{ sets }] = await db.query(`SELECT count(*)::int AS sets FROM code_suggestion_set WHERE study_id = $1`, [record.id]);
    expect(sets).toBe(2);
  });
});

describe('the export of reviewed codes', () => {
  it('writes CSV with a header, one row per reported code, and neutralises a cell a spreadsheet would run as a formula', async () => {
    const { record } = await signedStudy();
    let r = await review(record.id);
    for (const l of r.lines) r = (await post(`/api/coding/studies/${record.id}/decisions`, coder, { setId: r.set.id, decision: 'accept', lineId: l.id }).expect(200)).body;
    r = (await post(`/api/coding/studies/${record.id}/codes`, coder, { setId: r.set.id, system: 'ICD-10-CM', code: 'Z95.5', units: 1, modifiers: [], reason: '=HYPERLINK("http://example.invalid")' }).expect(201)).body;
    await post(`/api/coding/studies/${record.id}/complete`, coder, { setId: r.set.id }).expect(200);
    const today = new Date().toISOString().slice(0, 10);
    const res = await api().get(`/api/coding/export?from=${today}&to=${today}`).set('Cookie', coder).expect(200);
    expect(res.headers['content-type']).toMatch(/^text\/csv/);
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="?codes-\d{4}-\d{2}-\d{2}-\d{4}-\d{2}-\d{2}\.csv"?$/);
    const lines = res.text.split('\r\n').filter(Boolean);
    expect(lines[0]).toBe('accession,mrn,patient,date_of_service,report_version,system,code,modifiers,units,description,rule_id,decision,reason,coded_by,coded_at');
    const mine = lines.filter((l) => l.startsWith(`${record.accession},`));
    expect(mine).toHaveLength(r.lines.length);
    expect(mine.find((l) => l.includes(',93458,'))).toMatch(/,2025-03-11,1,CPT,93458,26,1,/);
    // A cell beginning with = is prefixed with an apostrophe (OWASP, "CSV Injection").
    expect(mine.find((l) => l.includes(',Z95.5,'))).toContain(`"'=HYPERLINK(""http://example.invalid"")"`);
    const [audit] = await db.query(`SELECT detail FROM audit_event WHERE action = 'export' AND entity_type = 'study-coding' ORDER BY id DESC LIMIT 1`);
    expect(audit.detail).toMatchObject({ from: today, to: today, format: 'csv' });
    await api().get(`/api/coding/export?from=${today}&to=2000-01-01`).set('Cookie', coder).expect(400);
    await api().get(`/api/coding/export?from=${today}&to=${today}`).set('Cookie', physician).expect(403);
  });
});

describe('the lab\'s day', () => {
  it('is the same day for the queue and the export: a study signed and coded at 22:30 in New York belongs to that day, not the next', async () => {
    const [{ time_zone: before }] = await db.query(`SELECT time_zone FROM lab_settings WHERE id = 1`);
    await db.query(`UPDATE lab_settings SET time_zone = 'America/New_York' WHERE id = 1`);
    try {
      // 03:30 UTC on 4 March 2025 is 22:30 on 3 March in New York (EST, UTC−5 until the second Sunday
      // of March — US Energy Policy Act of 2005, §110).
      const at = new Date('2025-03-04T03:30:00.000Z');
      const record = await recordedStudy(sections());
      await runSuggestCodes(await insertReportVersion(db, record, { signedBy: physicianId, signedAt: at }));
      let r = await review(record.id);
      for (const l of r.lines) r = (await post(`/api/coding/studies/${record.id}/decisions`, coder, { setId: r.set.id, decision: 'accept', lineId: l.id }).expect(200)).body;
      await post(`/api/coding/studies/${record.id}/complete`, coder, { setId: r.set.id }).expect(200);
      await db.query(`UPDATE coding_review SET completed_at = $2 WHERE study_id = $1`, [record.id, at]);
      const [{ queued_at: queuedAt }] = await db.query(`SELECT queued_at FROM coding_review WHERE study_id = $1`, [record.id]);
      expect(queuedAt.toISOString()).toBe(at.toISOString());

      const queued = async (day: string) =>
        (await api().get(`/api/coding/queue?status=coded&from=${day}&to=${day}`).set('Cookie', coder).expect(200)).body.items.some((i: { studyId: string }) => i.studyId === record.id);
      const exported = async (day: string) =>
        (await api().get(`/api/coding/export?from=${day}&to=${day}&format=json`).set('Cookie', coder).expect(200)).body.items.some((c: { accession: string }) => c.accession === record.accession);
      expect({ queue: await queued('2025-03-03'), export: await exported('2025-03-03') }).toEqual({ queue: true, export: true });
      expect({ queue: await queued('2025-03-04'), export: await exported('2025-03-04') }).toEqual({ queue: false, export: false });
    } finally {
      await db.query(`UPDATE lab_settings SET time_zone = $1 WHERE id = 1`, [before]);
    }
  });
});
