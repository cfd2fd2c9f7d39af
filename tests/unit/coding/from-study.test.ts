import { describe, expect, it } from 'vitest';
import { emptyStudyCoding, studyCodingSchema, suggestCodes, toCodingInput, type StudyCoding } from '../../../shared/coding';
import { analyzeStudy } from '../../../shared/physiology';
import { emptyDetails, emptyDose, emptySetup, emptyVasoreactivity, emptyVessel, type StudySections, type VesselAssessment } from '../../../shared/study/schema';
import { toPhysiologyInput } from '../../../shared/study/to-physiology';

const ids = ['8c9c6d0e-1f2a-4b3c-9d4e-5f6a7b8c9d01', '8c9c6d0e-1f2a-4b3c-9d4e-5f6a7b8c9d02', '8c9c6d0e-1f2a-4b3c-9d4e-5f6a7b8c9d03'];

type Rec = Pick<StudySections, 'details' | 'setup' | 'vessels' | 'vasoreactivity'> & { coding: StudyCoding };

function study(o: { vessels?: VesselAssessment[]; coding?: Partial<StudyCoding>; agent?: StudySections['setup']['hyperemicAgent']; question?: StudySections['details']['clinicalQuestion']; doses?: StudySections['vasoreactivity']['doses']; start?: string | null } = {}): Rec {
  return {
    details: { ...emptyDetails(), clinicalQuestion: o.question ?? null, procedureStartedAt: o.start === undefined ? '2025-05-06T09:30:00+02:00' : o.start },
    setup: { ...emptySetup(), hyperemicAgent: o.agent === undefined ? 'adenosine' : o.agent },
    vessels: o.vessels ?? [],
    vasoreactivity: { ...emptyVasoreactivity(), doses: o.doses ?? [] },
    coding: { ...emptyStudyCoding(), patientClass: 'outpatient', billing: 'professional', setting: 'hospital', diagnosticCath: 'done', coronaryAngiography: true, leftHeart: true, angina: true, ...o.coding },
  };
}
const map = (rec: Rec) => toCodingInput(rec, analyzeStudy(toPhysiologyInput(rec)));

// Hand-computed case A of the physiology checks (formulas, not a paper): FFR 0.80, CFR 3.00, IMR 21.6.
const ladFull = (): VesselAssessment => ({ ...emptyVessel(ids[0], 'LAD'), restPa: 100, restPd: 95, hyperemiaPa: 90, hyperemiaPd: 72, restTransit: [0.9, 0.9, 0.9], hyperemiaTransit: [0.3, 0.3, 0.3] });
const rcaResting = (): VesselAssessment => ({ ...emptyVessel(ids[1], 'RCA'), nhprKind: 'diastolic', nhprValue: 0.93 });

describe('a study record and its analysis become the coding input', () => {
  it('measured indices per vessel come from the analysis; the hyperaemic agent counts only where hyperaemic data exist — CPT 93571/93572 count vessels (coding articles summarising CPT)', () => {
    const input = map(study({ vessels: [ladFull(), rcaResting(), emptyVessel(ids[2], 'LCX')] }));
    expect(input.physiology).toEqual([
      { vessel: 'LAD', measured: ['ffr', 'nhpr', 'cfr', 'imr'], hyperemicAgent: true },
      { vessel: 'RCA', measured: ['nhpr'], hyperemicAgent: false },
    ]);
    const r = suggestCodes(input);
    expect(r.codes.filter((c) => c.system === 'CPT').map((c) => `${c.code} x${c.units}`)).toEqual(['93458 x1', '93571 x1', '93572 x1']);
    expect(r.warnings.find((w) => w.code === 'resting-only-physiology')?.message).toContain('RCA');
  });

  it('FFR 0.80 in the LAD is obstructive disease; with angina documented → I25.119 — FFR ≤ 0.80 abnormal (ESC 2024); CMS ICD-10-CM tabular I25.11-', () => {
    const input = map(study({ vessels: [ladFull()] }));
    expect(input.diagnoses).toEqual({ obstructiveCad: true, angina: true, microvascularDysfunction: false, vasospasm: null });
    expect(suggestCodes(input).codes.filter((c) => c.system === 'ICD-10-CM').map((c) => c.code)).toEqual(['I25.119']);
  });

  it('the encounter, catheterization and interventions pass through; the date of service is the procedure date — CPT releases by date of service (CMS)', () => {
    const input = map(
      study({
        coding: { rightHeart: true, leftVentriculography: true, interventions: [{ id: ids[0], vessel: 'LAD', kind: 'stent', branch: false, stent: 'drug-eluting' }, { id: ids[1], vessel: 'DIAGONAL', kind: 'balloon', branch: true, stent: 'drug-eluting' }] },
      }),
    );
    expect(input.billing).toBe('professional');
    expect(input.cath).toEqual({ coronaryAngiography: true, leftHeart: true, rightHeart: true, graftAngiography: false, leftVentriculography: true });
    expect(input.pci).toEqual([{ vessel: 'LAD', kind: 'stent', stent: 'drug-eluting' }, { vessel: 'DIAGONAL', kind: 'balloon', branch: true }]);
    expect(input.dateOfService).toBe('2025-05-06');
  });

  it('"none" means no catheterization; not recorded is a blocking note — no silent default (common practice)', () => {
    expect(map(study({ coding: { diagnosticCath: 'none' } })).cath).toBeNull();
    const unknown = map(study({ coding: { diagnosticCath: null } }));
    expect(unknown.cath).toBeNull();
    expect(unknown.notes).toContainEqual(expect.objectContaining({ code: 'cath-not-recorded', blocking: true }));
    expect(suggestCodes(unknown).warnings.some((w) => w.code === 'cath-not-recorded' && w.blocking)).toBe(true);
  });

  it('an unrecorded encounter passes through as null and blocks the review — common practice', () => {
    const r = suggestCodes(map(study({ coding: { billing: null, setting: null, patientClass: null } })));
    expect(r.warnings.find((w) => w.code === 'encounter-not-recorded')?.blocking).toBe(true);
  });

  it.each([
    { agent: 'adenosine', vessel: 'LAD', counts: true, note: null },
    { agent: 'papaverine', vessel: 'LAD', counts: true, note: null },
    { agent: 'other', vessel: 'LAD', counts: true, note: null },
    { agent: 'none', vessel: 'LAD', counts: false, note: 'hyperemic-agent-none' },
    { agent: null, vessel: 'LAD', counts: false, note: 'hyperemic-agent-not-recorded' },
    { agent: 'adenosine', vessel: 'RCA (resting ratio only)', counts: false, note: null },
  ] as const)(
    'agent $agent, $vessel → hyperaemic drug counts: $counts — the drug counts for a vessel when the study\'s agent was given and that vessel has hyperaemic measurements (CPT 93571/93572 "pharmacologically induced stress" wording [memory])',
    ({ agent, vessel, counts, note }) => {
      const input = map(study({ agent, vessels: [vessel === 'LAD' ? ladFull() : rcaResting()] }));
      expect(input.physiology[0].hyperemicAgent).toBe(counts);
      const codes = (input.notes ?? []).map((n) => n.code).filter((c) => c.startsWith('hyperemic-agent'));
      expect(codes).toEqual(note ? [note] : []);
    },
  );

  it.each([
    // 22:00 on New Year's Eve in New York is 03:00 UTC on 1 January: the lab's day decides.
    { start: '2026-01-01T03:00:00.000Z', timeZone: 'America/New_York', day: '2025-12-31' },
    { start: '2026-01-01T03:00:00.000Z', timeZone: 'UTC', day: '2026-01-01' },
    { start: '2025-09-30T23:30:00.000Z', timeZone: 'Europe/Berlin', day: '2025-10-01' },
    { start: '2025-05-06T09:30:00+02:00', timeZone: undefined, day: '2025-05-06' },
  ])(
    'procedure started $start, lab in $timeZone → date of service $day — code sets apply by date of service (CMS: CPT from 1 January, ICD-10 from 1 October)',
    ({ start, timeZone, day }) => {
      const rec = study({ start });
      const input = toCodingInput(rec, analyzeStudy(toPhysiologyInput(rec)), { timeZone });
      expect(input.dateOfService).toBe(day);
    },
  );

  it('a New Year\'s Eve evening procedure in a lab west of UTC is coded with that year\'s releases — CPT releases take effect 1 January (AMA); ICD-10-CM FY from 1 October (CMS)', () => {
    const rec = study({ start: '2025-01-01T03:00:00.000Z' });
    const local = suggestCodes(toCodingInput(rec, analyzeStudy(toPhysiologyInput(rec)), { timeZone: 'America/Chicago' }));
    expect(local.codeSets.dateOfService).toBe('2024-12-31');
    expect(local.codeSets.CPT.label).toBe('CPT 2024');
    const utc = suggestCodes(toCodingInput(rec, analyzeStudy(toPhysiologyInput(rec)), { timeZone: 'UTC' }));
    expect(utc.codeSets.CPT.label).toBe('CPT 2025');
  });

  it('hyperaemic data with no agent recorded: not counted as hyperaemic, with a note — common practice', () => {
    const input = map(study({ agent: null, vessels: [ladFull()] }));
    expect(input.physiology[0].hyperemicAgent).toBe(false);
    expect(input.notes?.map((n) => n.code)).toContain('hyperemic-agent-not-recorded');
  });

  it('angina not stated: taken from the clinical question, with a note — common practice', () => {
    const yes = map(study({ coding: { angina: null }, question: 'angina-no-obstruction' }));
    expect(yes.diagnoses.angina).toBe(true);
    const no = map(study({ coding: { angina: null }, question: 'intermediate-lesion' }));
    expect(no.diagnoses.angina).toBe(false);
    for (const i of [yes, no]) expect(i.notes?.map((n) => n.code)).toContain('angina-inferred');
    expect(map(study()).notes ?? []).toEqual([]);
  });

  it('acetylcholine spasm reaches the diagnoses and the provocation warning — COVADIS (≥ 90% constriction with symptoms and ischaemic ECG = epicardial spasm); CMS ICD-10-CM I20.1', () => {
    const dose = { ...emptyDose(ids[2], 'LAD'), micrograms: 100, constrictionPct: 95, symptoms: true, ischemicEcg: true };
    const input = map(study({ doses: [dose], coding: { angina: true } }));
    expect(input.vasoreactivity).toEqual({ agent: 'acetylcholine', vessel: 'LAD' });
    expect(input.diagnoses.vasospasm).toBe('epicardial');
    const r = suggestCodes(input);
    expect(r.codes.filter((c) => c.system === 'ICD-10-CM').map((c) => c.code)).toEqual(['I20.1']);
    expect(r.warnings.map((w) => w.code)).toContain('provocation-no-code');
  });

  it('a vessel decided for intervention with none recorded is noted — common practice', () => {
    const input = map(study({ vessels: [{ ...ladFull(), decision: 'pci' }] }));
    expect(input.notes?.map((n) => n.code)).toContain('pci-decision-without-intervention');
  });

  it('the date of service is the lab\'s calendar day, not UTC\'s: it picks the code-set release (CPT by calendar year — AMA CPT release cycle)', () => {
    // 19:30 in New York on 31 December 2025 is 00:30 UTC on 1 January 2026.
    const rec = study({ start: '2026-01-01T00:30:00.000Z' });
    const analysis = analyzeStudy(toPhysiologyInput(rec));
    const newYork = toCodingInput(rec, analysis, { timeZone: 'America/New_York' });
    expect(newYork.dateOfService).toBe('2025-12-31');
    expect(suggestCodes(newYork).codeSets.CPT.year).toBe(2025);
    expect(toCodingInput(rec, analysis, { timeZone: 'UTC' }).dateOfService).toBe('2026-01-01');
    expect(toCodingInput(rec, analysis).dateOfService).toBe('2026-01-01');
    // East of Greenwich the day turns earlier: 23:30 UTC on 30 September is 1 October in Tokyo (ICD-10 FY starts 1 October — CMS).
    const tokyo = toCodingInput(study({ start: '2025-09-30T23:30:00Z' }), analysis, { timeZone: 'Asia/Tokyo' });
    expect(tokyo.dateOfService).toBe('2025-10-01');
    expect(suggestCodes(tokyo).codeSets['ICD-10-CM'].year).toBe(2026);
  });

  it('no procedure date → dateOfService null, which is warned — CPT releases by date of service (CMS)', () => {
    const input = map(study({ start: null }));
    expect(input.dateOfService).toBeNull();
    expect(suggestCodes(input).warnings.map((w) => w.code)).toContain('date-of-service-missing');
  });

  it('the coding section schema rejects an unknown intervention kind — a bad record is refused, not coded (common practice)', () => {
    const bad = { ...emptyStudyCoding(), interventions: [{ id: ids[0], vessel: 'LAD', kind: 'laser', branch: false, stent: null }] };
    expect(studyCodingSchema.safeParse(bad).success).toBe(false);
    expect(() => toCodingInput({ ...study(), coding: bad as never }, analyzeStudy({ vessels: [] }))).toThrow();
  });
});

describe('microvascular dysfunction whose type cannot be decided is still coded as microvascular dysfunction — CMS ICD-10-CM tabular FY2024–FY2026: I20.81 angina with coronary microvascular dysfunction; EAPCI 2020 INOCA consensus: the subtype needs both CFR and IMR', () => {
  it('LAD FFR 0.90 (not obstructive, ESC 2024) and IMR 90 × 0.40 = 36 U (≥ 25) with no CFR: no subtype, dysfunction true → I20.81 with angina', () => {
    const lad: VesselAssessment = { ...emptyVessel(ids[0], 'LAD'), hyperemiaPa: 100, hyperemiaPd: 90, hyperemiaTransit: [0.4, 0.4, 0.4] };
    const rec = study({ vessels: [lad] });
    const analysis = analyzeStudy(toPhysiologyInput(rec));
    expect(analysis.findings.microvascular).toBeNull();
    expect(analysis.findings.microvascularDysfunction).toBe(true);
    const input = toCodingInput(rec, analysis);
    expect(input.diagnoses).toEqual({ obstructiveCad: false, angina: true, microvascularDysfunction: true, vasospasm: null });
    expect(suggestCodes(input).codes.filter((c) => c.system === 'ICD-10-CM').map((c) => c.code)).toEqual(['I20.81']);
  });
  it('an analysis stored before the field existed is read by its subtype (common practice: a stored signed analysis is read as stored)', () => {
    const rec = study({ vessels: [ladFull()] });
    const analysis = analyzeStudy(toPhysiologyInput(rec));
    const stored = { ...analysis, findings: { obstructive: false, microvascular: 'structural', endothelialDysfunction: false, vasospasm: null } } as unknown as typeof analysis;
    expect(toCodingInput(rec, stored).diagnoses.microvascularDysfunction).toBe(true);
    const storedNone = { ...analysis, findings: { obstructive: false, microvascular: null, endothelialDysfunction: false, vasospasm: null } } as unknown as typeof analysis;
    expect(toCodingInput(rec, storedNone).diagnoses.microvascularDysfunction).toBe(false);
  });
});
