import { beforeAll, describe, expect, it } from 'vitest';
import type { Bundle, CodeSystem, DiagnosticReport, Encounter, Observation, Patient, Resource } from 'fhir/r4';
import { ZodError } from 'zod';
import { analyzeStudy, type PhysiologyInput } from '../../../shared/physiology';
import { formatQuantity } from '../../../shared/physiology/precision';
import { toReportBundle } from '../../../fhir/report-bundle';
import { ISOBAR_CODE_SYSTEM, localConcepts, vesselBodySite } from '../../../fhir/codes';
import { uuidV5 } from '../../../fhir/uuid';
import { checkBundle, codesOf, errorsOf, isobarCodeSystem, ucumProblem, warmUpValidation } from '../../../server/ehr/validate-bundle';
import { fhirIssues } from '../../support/fhir-validator';
import { caseA, hashes, reportInput } from './fixtures';

// Indexing the FHIR R4 definitions takes a few seconds on a busy machine: once, before the tests.
beforeAll(() => {
  warmUpValidation();
  fhirIssues({ resourceType: 'Basic', code: { text: 'warm-up' } } as Resource);
}, 60_000);

const resources = <T,>(b: Bundle, type: string) => b.entry!.filter((e) => e.resource?.resourceType === type).map((e) => e.resource as T);
const report = (b: Bundle) => resources<DiagnosticReport>(b, 'DiagnosticReport')[0];
const observation = (b: Bundle, code: string, vesselId = 'vessel-lad') =>
  resources<Observation>(b, 'Observation').find((o) => o.identifier![0].value!.endsWith(`/vessel/${vesselId}/${code}`))!;
const studyObservation = (b: Bundle, code: string) => resources<Observation>(b, 'Observation').find((o) => o.identifier![0].value!.endsWith(`/study/${code}`));

/** Every resource and the bundle: zero errors by the FHIR R4 structure definitions and our code/unit checks. */
function expectValid(b: Bundle) {
  const issues = checkBundle(b);
  expect(errorsOf(issues), JSON.stringify(errorsOf(issues), null, 1)).toEqual([]);
  expect(issues.filter((i) => i.severity === 'warning')).toEqual([]);
  // The same entries one by one with the shared test validator (FHIR R4 StructureDefinitions via
  // @medplum/core); its only complaint may be its reading of urn:uuid references (see validate-bundle.ts).
  for (const e of b.entry!) {
    expect(fhirIssues(e.resource!).filter((m) => !/Invalid reference: got "urn:uuid:/.test(m))).toEqual([]);
  }
}

/** Study set: every index, every resting-ratio kind, a corrected IMR, a borderline MRR, acetylcholine. */
const microvascular: PhysiologyInput = {
  vessels: [
    caseA,
    // LCx: CFR 0.9/0.5 = 1.80 (< 2.0 abnormal), IMR 80 × 0.5 = 40 (≥ 25 abnormal).
    { id: 'vessel-lcx', vessel: 'LCX', rest: { pa: 95, pd: 93, tmn: [0.9, 0.9, 0.9] }, hyperemia: { pa: 85, pd: 80, tmn: [0.5, 0.5, 0.5] }, nhpr: { kind: 'diastolic', value: 0.93 } },
    { id: 'vessel-rca', vessel: 'RCA', nhpr: { kind: 'full-cycle-minimum', value: 0.88 }, visualStenosisPct: 40 },
    { id: 'vessel-om', vessel: 'OBTUSE_MARGINAL', nhpr: { kind: 'whole-cycle', value: 0.95 } },
    { id: 'vessel-diag', vessel: 'DIAGONAL', ffr: 0.86 },
  ],
  vasoreactivity: { doses: [{ vessel: 'LAD', micrograms: 100, constrictionPct: 95, symptoms: true, ischemicEcg: true }] },
};

describe('the bundle validates against FHIR R4 with zero issues', () => {
  it.each([
    ['a single vessel, transaction', reportInput()],
    ['five vessels with acetylcholine, transaction', reportInput(microvascular)],
    ['five vessels, collection', { ...reportInput(microvascular), bundleType: 'collection' as const }],
    ['no encounter, no accession, no organisation', { ...reportInput(), encounter: undefined, accession: undefined, organization: undefined }],
    ['an addendum', reportInput(undefined, { report: { id: 'r', version: 3, status: 'amended', previousVersion: 2, signedAt: '2025-03-06T08:00:00Z', signer: { name: 'Dr A' } } })],
    ['entered in error', reportInput(undefined, { report: { id: 'r', version: 2, status: 'entered-in-error', signedAt: '2025-03-06T08:00:00Z', signer: { name: 'Dr A' } } })],
  ])('%s', (_name, input) => {
    expectValid(toReportBundle(input));
  });
});

describe('DiagnosticReport', () => {
  const b = toReportBundle(reportInput());
  const dr = report(b);

  it('claims the US Core DiagnosticReport note profile (US Core IG, DiagnosticReport for report and note exchange)', () => {
    expect(dr.meta?.profile).toEqual(['http://hl7.org/fhir/us/core/StructureDefinition/us-core-diagnosticreport-note']);
  });

  it('is categorised cardiac catheterization (HL7 v2 table 0074 "CTH") and cardiology (LOINC LP29708-2, US Core category)', () => {
    const codings = dr.category!.flatMap((c) => c.coding!);
    expect(codings).toContainEqual({ system: 'http://terminology.hl7.org/CodeSystem/v2-0074', code: 'CTH', display: 'Cardiac Catheterization' });
    expect(codings).toContainEqual({ system: 'http://loinc.org', code: 'LP29708-2', display: 'Cardiology' });
    // The display is the one the FHIR R4 definitions give for v2-0074 CTH.
    expect(codesOf('http://terminology.hl7.org/CodeSystem/v2-0074')!.has('CTH')).toBe(true);
  });

  it('is coded LOINC 18745-0 cardiac catheterization study (C-CDA on FHIR value sets)', () => {
    expect(dr.code.coding).toEqual([{ system: 'http://loinc.org', code: '18745-0', display: 'Cardiac catheterization study' }]);
  });

  it('carries the signed PDF; Attachment.hash is SHA-1 in base64 as FHIR R4 Attachment defines; our SHA-256 travels as an identifier', () => {
    const form = dr.presentedForm![0];
    expect(form.contentType).toBe('application/pdf');
    expect(form.data).toBe(reportInput().pdf.base64);
    expect(form.hash).toBe(hashes.sha1base64);
    expect(form.size).toBe(Buffer.from(form.data!, 'base64').length);
    expect(dr.identifier).toContainEqual({ use: 'secondary', system: 'https://isobar.example/fhir/sid/report-pdf-sha256', value: hashes.sha256hex });
  });

  it('names the order by accession number (HL7 v2 table 0203 "ACSN"), the interpreter, the performer and the dates', () => {
    expect(dr.basedOn![0].identifier).toMatchObject({ value: 'ACC-2025-0042', type: { coding: [{ system: 'http://terminology.hl7.org/CodeSystem/v2-0203', code: 'ACSN' }] } });
    expect(codesOf('http://terminology.hl7.org/CodeSystem/v2-0203')!.has('ACSN')).toBe(true);
    expect(dr.resultsInterpreter![0]).toMatchObject({ type: 'Practitioner', display: 'Dr Kemi Oduya' });
    expect(dr.performer!.map((p) => p.type)).toEqual(['Organization', 'Practitioner']);
    // FHIR R4 instant: seconds and a zone; 15:20 at +01:00 is 14:20 UTC.
    expect(dr.issued).toBe('2025-03-04T14:20:00.000Z');
    expect(dr.effectivePeriod).toEqual({ start: '2025-03-04T08:05:00.000Z', end: '2025-03-04T09:10:00.000Z' });
  });

  it('lists every Observation of the bundle as a result, by its fullUrl', () => {
    const obsUrls = b.entry!.filter((e) => e.resource?.resourceType === 'Observation').map((e) => e.fullUrl);
    expect(dr.result!.map((r) => r.reference)).toEqual(obsUrls);
  });
});

describe('Observations: values at display precision, UCUM units, interpretation, reference range', () => {
  const b = toReportBundle(reportInput());

  // Case A, hand-computed from the formulas (not from a paper): FFR 72/90 = 0.80, resting Pd/Pa 0.95,
  // CFR 0.90/0.30 = 3.00, IMR corrected (Yong, FFR ≤ 0.80) 20.52 → shown 21, RRR 3.96, MRR 4.17.
  it.each([
    ['ffr', 0.8, '1', 'L'],
    ['resting-pd-pa', 0.95, '1', 'N'],
    ['cfr', 3, '1', 'N'],
    ['imr', 21, 'mm[Hg].s', 'N'],
    ['rrr', 3.96, '1', 'N'],
    ['mrr', 4.17, '1', 'N'],
  ])('%s = %s [%s], interpretation %s', (code, value, unit, interp) => {
    const o = observation(b, code);
    expect(o.valueQuantity).toMatchObject({ value, system: 'http://unitsofmeasure.org', code: unit });
    expect(o.interpretation![0].coding![0]).toMatchObject({ system: 'http://terminology.hl7.org/CodeSystem/v3-ObservationInterpretation', code: interp });
  });

  it('every value is the display-precision value the report prints (the physiology core\'s formatQuantity)', () => {
    const analysis = analyzeStudy({ vessels: [caseA] }).vessels[0];
    expect(String(observation(b, 'imr').valueQuantity!.value)).toBe(formatQuantity(analysis.imr!, 'imr'));
    expect(observation(b, 'mrr').valueQuantity!.value!.toFixed(2)).toBe(formatQuantity(analysis.mrr!, 'ratio'));
  });

  it('every unit code is valid UCUM by @lhncbc/ucum-lhc; IMR is mm[Hg].s, because UCUM "U" is the enzyme unit', () => {
    const units = new Set(resources<Observation>(toReportBundle(reportInput(microvascular)), 'Observation').flatMap((o) => [o.valueQuantity?.code, ...(o.referenceRange ?? []).flatMap((r) => [r.low?.code, r.high?.code])]).filter(Boolean));
    expect([...units].sort()).toEqual(['%', '1', 'mm[Hg].s']);
    for (const u of units) expect(ucumProblem(u!)).toBeUndefined();
    expect(ucumProblem('mmHg')).toMatch(/not a valid UCUM/);
  });

  it('the IMR carries its method (Yong correction, as FFR ≤ 0.80 and no wedge) and the uncorrected value (21.6 → 22)', () => {
    const imr = observation(b, 'imr');
    expect(imr.method!.coding!.map((c) => c.code)).toEqual(['method-bolus-thermodilution', 'imr-yong']);
    expect(imr.component).toEqual([
      { code: { coding: [{ system: ISOBAR_CODE_SYSTEM, code: 'imr-uncorrected', display: localConcepts.imrUncorrected.display }], text: localConcepts.imrUncorrected.display }, valueQuantity: { value: 22, unit: 'mmHg·s', system: 'http://unitsofmeasure.org', code: 'mm[Hg].s' } },
    ]);
  });

  it('reference ranges restate the cut-offs the flags were judged by, at display precision', () => {
    // FFR abnormal ≤ 0.80 (ESC 2024; EAPCI 2020) → normal from 0.81.
    expect(observation(b, 'ffr').referenceRange![0]).toMatchObject({ low: { value: 0.81, code: '1' }, text: 'normal above 0.80; abnormal at 0.80 or below' });
    // Whole-cycle resting Pd/Pa abnormal ≤ 0.91 (CONTRAST) → normal from 0.92.
    expect(observation(b, 'resting-pd-pa').referenceRange![0].low!.value).toBe(0.92);
    // CFR abnormal < 2.0 (EAPCI 2020) → normal from 2.00.
    expect(observation(b, 'cfr').referenceRange![0].low!.value).toBe(2);
    // IMR abnormal ≥ 25 (ESC 2024; EAPCI 2020), whole numbers → normal up to 24.
    expect(observation(b, 'imr').referenceRange![0]).toMatchObject({ high: { value: 24, code: 'mm[Hg].s' } });
    // MRR < 2.1 abnormal, 2.1–2.7 borderline (de Vos et al., JACC CV Imaging 2023) → normal from 2.71.
    expect(observation(b, 'mrr').referenceRange![0]).toMatchObject({ low: { value: 2.71 }, text: 'abnormal below 2.10; borderline 2.10 to 2.70; normal from 2.71' });
  });

  it('a lab that raises the CFR borderline band to 2.5 (ESC 2024 uses < 2.5) gets that range and an equivocal 2.25', () => {
    // CFR 0.90/0.40 = 2.25: not abnormal at 2.0, borderline below 2.5.
    const v = { id: 'vessel-lad', vessel: 'LAD' as const, rest: { pa: 100, pd: 98, tmn: [0.9, 0.9, 0.9] }, hyperemia: { pa: 90, pd: 85, tmn: [0.4, 0.4, 0.4] } };
    const thresholds = { cfrBorderline: 2.5 };
    const bb = toReportBundle(reportInput({ vessels: [v], thresholds }, { thresholds }));
    const cfr = observation(bb, 'cfr');
    expect(cfr.valueQuantity!.value).toBe(2.25);
    expect(cfr.interpretation![0]).toEqual({ coding: [{ system: 'http://terminology.hl7.org/CodeSystem/v3-ObservationInterpretation', code: 'E', display: 'Equivocal' }], text: 'Borderline' });
    expect(cfr.referenceRange![0]).toMatchObject({ low: { value: 2.5 }, text: 'abnormal below 2.00; borderline from 2.00 up to 2.50; normal from 2.50' });
  });

  it('interpretation codes: abnormal low → L, abnormal high → H, normal → N, borderline → E, all codes of v3-ObservationInterpretation (FHIR R4)', () => {
    const bb = toReportBundle(reportInput(microvascular));
    expect(observation(bb, 'cfr', 'vessel-lcx').interpretation![0].coding![0].code).toBe('L'); // 1.80 < 2.0
    expect(observation(bb, 'imr', 'vessel-lcx').interpretation![0].coding![0].code).toBe('H'); // 40 ≥ 25
    expect(observation(bb, 'nhpr-full-cycle-minimum', 'vessel-rca').interpretation![0].coding![0].code).toBe('L'); // 0.88 ≤ 0.89
    expect(observation(bb, 'nhpr-whole-cycle', 'vessel-om').interpretation![0].coding![0].code).toBe('N'); // 0.95 > 0.91
    const all = resources<Observation>(bb, 'Observation').flatMap((o) => o.interpretation ?? []).flatMap((i) => i.coding!);
    const v3 = codesOf('http://terminology.hl7.org/CodeSystem/v3-ObservationInterpretation')!;
    for (const c of all) expect(v3.has(c.code!)).toBe(true);
  });

  it('a borderline MRR (2.1–2.7) is sent as E, not N or L', () => {
    // MRR = (CFR / FFR) × (Pa rest / Pa hyp): CFR 0.9/0.45 = 2.00, FFR 80/90 = 0.889 → 2.25 × 100/90 = 2.50.
    const v = { id: 'vessel-lad', vessel: 'LAD' as const, rest: { pa: 100, pd: 97, tmn: [0.9, 0.9, 0.9] }, hyperemia: { pa: 90, pd: 80, tmn: [0.45, 0.45, 0.45] } };
    const mrr = observation(toReportBundle(reportInput({ vessels: [v] })), 'mrr');
    expect(mrr.valueQuantity!.value).toBe(2.5);
    expect(mrr.interpretation![0].coding![0].code).toBe('E');
  });

  it('codes: Isobar CodeSystem first, plus SNOMED CT 371842003 for FFR (DICOM PS3.16 CID 3621) and DICOM 122217 for CFR (CID 3620); LOINC 80915-2 for percent stenosis', () => {
    const bb = toReportBundle(reportInput(microvascular));
    expect(observation(bb, 'ffr').code.coding!.map((c) => `${c.system}|${c.code}`)).toEqual([`${ISOBAR_CODE_SYSTEM}|ffr`, 'http://snomed.info/sct|371842003']);
    expect(observation(bb, 'cfr').code.coding!.map((c) => `${c.system}|${c.code}`)).toEqual([`${ISOBAR_CODE_SYSTEM}|cfr`, 'http://dicom.nema.org/resources/ontology/DCM|122217']);
    const stenosis = observation(bb, 'visual-stenosis', 'vessel-rca');
    expect(stenosis.code.coding!.map((c) => `${c.system}|${c.code}`)).toEqual([`${ISOBAR_CODE_SYSTEM}|visual-stenosis`, 'http://loinc.org|80915-2']);
    expect(stenosis.valueQuantity).toMatchObject({ value: 40, code: '%' });
    for (const code of ['nhpr-diastolic', 'nhpr-full-cycle-minimum', 'nhpr-whole-cycle']) {
      const o = resources<Observation>(bb, 'Observation').find((x) => x.code.coding![0].code === code);
      expect(o, code).toBeDefined();
    }
  });

  it('observation category is "procedure" (FHIR R4 observation-category)', () => {
    for (const o of resources<Observation>(b, 'Observation')) expect(o.category![0].coding![0]).toEqual({ system: 'http://terminology.hl7.org/CodeSystem/observation-category', code: 'procedure', display: 'Procedure' });
  });
});

describe('bodySite: SNOMED CT codes of DICOM PS3.16 coronary artery context groups', () => {
  const b = toReportBundle(reportInput(microvascular));
  it.each([
    // CID 3016 major coronary arteries
    ['vessel-lad', 'ffr', '59438005', 'Left anterior descending'],
    ['vessel-lcx', 'cfr', '57396003', 'Circumflex'],
    ['vessel-rca', 'nhpr-full-cycle-minimum', '13647002', 'Right coronary'],
    // CID 3014 coronary artery segments: marginal coronary artery 22765000
    ['vessel-om', 'nhpr-whole-cycle', '22765000', 'Obtuse marginal branch'],
    // A diagonal has codes only by number (CID 3014 1st/2nd/3rd diagonal): parent LAD, branch as text
    ['vessel-diag', 'ffr', '59438005', 'Diagonal branch (branch of the left anterior descending coronary artery)'],
  ])('%s → %s', (vesselId, code, snomed, text) => {
    const site = observation(b, code, vesselId).bodySite!;
    expect(site.coding).toEqual([expect.objectContaining({ system: 'http://snomed.info/sct', code: snomed })]);
    expect(site.text).toBe(text);
  });

  it('the other vessels: left main 3227004 (CID 3016), ramus 244252004 (CID 3014), PDA 53655008 (CID 3014), PLB 17269004 and graft 264293000 (CID 3015)', () => {
    expect(vesselBodySite.LM.code).toBe('3227004');
    expect(vesselBodySite.RAMUS.code).toBe('244252004');
    expect(vesselBodySite.PDA.code).toBe('53655008');
    expect(vesselBodySite.PLB.code).toBe('17269004');
    expect(vesselBodySite.GRAFT.code).toBe('264293000');
  });

  it('carries the segment as written in the study', () => {
    const bb = toReportBundle(reportInput(undefined, { analysis: { ...analyzeStudy({ vessels: [caseA] }), vessels: analyzeStudy({ vessels: [caseA] }).vessels.map((v) => ({ ...v, segment: 'proximal' })) } }));
    expect(observation(bb, 'ffr').bodySite!.text).toBe('Left anterior descending, proximal');
  });
});

describe('acetylcholine result and endotype', () => {
  it('sent when coronary function was tested: epicardial spasm (≥ 90% with symptoms and ECG changes, COVADIS) is abnormal', () => {
    const b = toReportBundle(reportInput(microvascular));
    const ach = studyObservation(b, 'acetylcholine-test')!;
    expect(ach.valueCodeableConcept!.coding![0]).toMatchObject({ system: ISOBAR_CODE_SYSTEM, code: 'ach-epicardial-spasm' });
    expect(ach.interpretation![0].coding![0].code).toBe('A');
    expect(ach.bodySite).toBeUndefined();
    const endotype = studyObservation(b, 'endotype')!;
    const expected = analyzeStudy(microvascular).endotype;
    expect(endotype.valueCodeableConcept!.coding![0].code).toBe(`endotype-${expected}`);
    expect(report(b).conclusionCode![0].coding![0].code).toBe(`endotype-${expected}`);
  });

  // COVADIS (Ong et al., Int J Cardiol 2018;250:16-20): microvascular *angina* needs the symptom. The
  // code names the endotype class; the text says angina only when the record says angina.
  it('names microvascular angina in the text only when angina is recorded; the code stays the endotype class', () => {
    const lcxOnly: PhysiologyInput = {
      vessels: [{ id: 'vessel-lcx', vessel: 'LCX', rest: { pa: 95, pd: 93, tmn: [0.9, 0.9, 0.9] }, hyperemia: { pa: 85, pd: 80, tmn: [0.5, 0.5, 0.5] }, visualStenosisPct: 30 }],
      vasoreactivity: { doses: [{ vessel: 'LAD', micrograms: 100, constrictionPct: 10, symptoms: false, ischemicEcg: false }] },
    };
    const analysis = analyzeStudy({ ...lcxOnly, angina: true });
    expect(analysis.endotype).toBe('microvascular-angina');
    const texts = (angina: boolean | undefined) => {
      const b = toReportBundle(reportInput(lcxOnly, { analysis: { ...analysis, ...(angina === undefined ? {} : { angina }) } }));
      const endotype = studyObservation(b, 'endotype')!;
      expect(endotype.valueCodeableConcept!.coding![0].code).toBe('endotype-microvascular-angina');
      return [endotype.valueCodeableConcept!.text, report(b).conclusionCode![0].text];
    };
    expect(texts(true)).toEqual(['Microvascular angina', 'Microvascular angina']);
    expect(texts(false)).toEqual(['Coronary microvascular dysfunction', 'Coronary microvascular dysfunction']);
    expect(texts(undefined)).toEqual(['Coronary microvascular dysfunction', 'Coronary microvascular dysfunction']);
  });

  // EAPCI 2020 INOCA consensus (Kunadian et al.): the subtype needs both CFR and IMR; COVADIS (Ong et al., IJC 2018):
  // IMR ≥ 25 alone is impaired microvascular function. Dysfunction of a type not known is still the microvascular endotype.
  it('raised IMR with CFR not measured is sent as the microvascular endotype, abnormal', () => {
    // LCX Pa 100, Pd 90 (FFR 0.90), hyperaemic Tmn 0.40 s → IMR 36 U; no resting Tmn, so no CFR.
    const imrOnly: PhysiologyInput = {
      vessels: [{ id: 'vessel-lcx', vessel: 'LCX', hyperemia: { pa: 100, pd: 90, tmn: [0.4, 0.4, 0.4] } }],
      vasoreactivity: { doses: [{ vessel: 'LAD', micrograms: 100, constrictionPct: 10, symptoms: false, ischemicEcg: false }] },
      angina: true,
    };
    const a = analyzeStudy(imrOnly);
    expect(a.findings).toMatchObject({ microvascular: null, microvascularDysfunction: true });
    const b = toReportBundle(reportInput(imrOnly, { analysis: { ...a, angina: true } }));
    const endotype = studyObservation(b, 'endotype')!;
    expect(endotype.valueCodeableConcept!.coding![0].code).toBe('endotype-microvascular-angina');
    expect(endotype.valueCodeableConcept!.text).toBe('Microvascular angina');
    expect(endotype.interpretation![0].coding![0].code).toBe('A');
  });

  // EAPCI 2020; CorMicA: "no coronary abnormality" needs a negative acetylcholine test; COVADIS: constriction without
  // symptoms or ECG changes is endothelial dysfunction, not spasm.
  it('endothelial dysfunction with everything else normal is not sent as "no coronary abnormality" or Normal', () => {
    const ed: PhysiologyInput = {
      vessels: [{ id: 'vessel-lad', vessel: 'LAD', rest: { pa: 100, pd: 97, tmn: [0.6, 0.6, 0.6] }, hyperemia: { pa: 100, pd: 90, tmn: [0.2, 0.2, 0.2] } }],
      vasoreactivity: { doses: [{ vessel: 'LAD', micrograms: 100, constrictionPct: 50, symptoms: false, ischemicEcg: false }] },
    };
    const b = toReportBundle(reportInput(ed));
    const endotype = studyObservation(b, 'endotype')!;
    expect(endotype.valueCodeableConcept!.coding![0].code).toBe('endotype-inconclusive');
    expect(endotype.interpretation).toBeUndefined();
    expect(studyObservation(b, 'acetylcholine-test')!.valueCodeableConcept!.coding![0].code).toBe('ach-endothelial-dysfunction');
  });

  it('a plain pressure-wire study sends no endotype and no acetylcholine result', () => {
    const b = toReportBundle(reportInput({ vessels: [{ id: 'vessel-lad', vessel: 'LAD', ffr: 0.75 }] }));
    expect(studyObservation(b, 'endotype')).toBeUndefined();
    expect(studyObservation(b, 'acetylcholine-test')).toBeUndefined();
    expect(report(b).conclusionCode).toBeUndefined();
    expect(resources<Observation>(b, 'Observation').map((o) => o.code.coding![0].code)).toEqual(['ffr']);
    // Entered at the console: the method says so.
    expect(observation(b, 'ffr').method!.coding![0].code).toBe('method-console');
  });
});

describe('a transaction that never duplicates at the EHR', () => {
  it('Patient and Encounter are conditional creates by identifier (FHIR R4 http.html#ccreate)', () => {
    const b = toReportBundle(reportInput());
    const [patientEntry, encounterEntry] = b.entry!;
    expect(patientEntry.request).toEqual({ method: 'POST', url: 'Patient', ifNoneExist: 'identifier=urn%3Aoid%3A2.16.840.1.113883.19.5|MRN-000123' });
    expect((patientEntry.resource as Patient).gender).toBe('female');
    expect(encounterEntry.request!.ifNoneExist).toBe('identifier=urn%3Aoid%3A2.16.840.1.113883.19.6|ENC-55');
    // Encounter.class from HL7 v3 ActCode: AMB ambulatory.
    expect((encounterEntry.resource as Encounter).class).toEqual({ system: 'http://terminology.hl7.org/CodeSystem/v3-ActCode', code: 'AMB', display: 'ambulatory' });
    expect(codesOf('http://terminology.hl7.org/CodeSystem/v3-ActCode')!.has('AMB')).toBe(true);
  });

  it('the report and observations are conditional updates by identifiers that stay the same across versions (FHIR R4 http.html#cond-update)', () => {
    const v1 = toReportBundle(reportInput());
    const v2 = toReportBundle(reportInput(undefined, { report: { id: 'report-7f3a', version: 2, status: 'amended', previousVersion: 1, signedAt: '2025-03-05T08:00:00Z', signer: { name: 'Dr A' } } }));
    const urls = (b: Bundle) => b.entry!.map((e) => `${e.request!.method} ${e.request!.url}`);
    expect(urls(v2)).toEqual(urls(v1));
    expect(report(v1).identifier![0]).toEqual({ system: 'https://isobar.example/fhir/sid/report', value: 'report-7f3a' });
    expect(urls(v1).at(-1)).toBe('PUT DiagnosticReport?identifier=https%3A%2F%2Fisobar.example%2Ffhir%2Fsid%2Freport|report-7f3a');
    expect(v1.identifier).toEqual({ system: 'https://isobar.example/fhir/sid/report-version', value: 'report-7f3a/v1' });
    expect(v2.identifier!.value).toBe('report-7f3a/v2');
    expect(report(v2).status).toBe('amended');
    expect(report(v2).presentedForm![0].title).toBe('Coronary physiology report, version 2 (amends version 1)');
    expect(resources<Observation>(v2, 'Observation').every((o) => o.status === 'amended')).toBe(true);
  });

  it('the same input gives the same bundle, byte for byte: name-based UUIDs and the report\'s own timestamps', () => {
    const a = JSON.stringify(toReportBundle(reportInput(microvascular)));
    const b = JSON.stringify(toReportBundle(reportInput(microvascular)));
    expect(a).toBe(b);
    const bundle = toReportBundle(reportInput(microvascular));
    for (const e of bundle.entry!) expect(e.fullUrl).toMatch(/^urn:uuid:[0-9a-f]{8}-[0-9a-f]{4}-5[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
    expect(new Set(bundle.entry!.map((e) => e.fullUrl)).size).toBe(bundle.entry!.length);
  });

  it('UUID v5 matches the RFC 9562 / RFC 4122 test vector (DNS namespace, "www.example.com")', () => {
    // RFC 4122 Appendix B lists only a v3 example; this v5 value is the one Python's uuid.uuid5(NAMESPACE_DNS, 'www.example.com') gives.
    expect(uuidV5('www.example.com', '6ba7b810-9dad-11d1-80b4-00c04fd430c8')).toBe('2ed6657d-e927-568b-95e1-2665a8aea6a2');
  });
});

describe('input is refused when it cannot make a truthful report', () => {
  it.each([
    ['an amended report without the version it amends', reportInput(undefined, { report: { id: 'r', version: 2, status: 'amended', signedAt: '2025-03-05T08:00:00Z', signer: { name: 'A' } } }), 'previousVersion'],
    ['an amended report "amending" a later version', reportInput(undefined, { report: { id: 'r', version: 2, status: 'amended', previousVersion: 2, signedAt: '2025-03-05T08:00:00Z', signer: { name: 'A' } } }), 'previousVersion'],
    ['a final report naming a previous version', reportInput(undefined, { report: { id: 'r', version: 2, status: 'final', previousVersion: 1, signedAt: '2025-03-05T08:00:00Z', signer: { name: 'A' } } }), 'previousVersion'],
    ['a PDF that does not match its fingerprint', reportInput(undefined, { pdf: { base64: Buffer.from('other').toString('base64'), sha256: hashes.sha256hex } }), 'sha256'],
    ['a patient without identifiers', reportInput(undefined, { patient: { identifiers: [], family: 'X', given: [], birthDate: '1960-01-01', sex: 'male' } }), 'identifiers'],
    ['a signing time without a zone', reportInput(undefined, { report: { id: 'r', version: 1, status: 'final', signedAt: '2025-03-05T08:00:00', signer: { name: 'A' } } }), 'signedAt'],
  ])('%s', (_name, input, field) => {
    try {
      toReportBundle(input);
      expect.unreachable('should have thrown');
    } catch (error) {
      expect(error).toBeInstanceOf(ZodError);
      expect((error as ZodError).issues.map((i) => i.path.join('.')).join(' ')).toContain(field);
    }
  });
});

describe("Isobar's CodeSystem resource", () => {
  const cs: CodeSystem = isobarCodeSystem();
  it('is a valid FHIR R4 CodeSystem at the canonical URL the bundle uses', () => {
    expect(fhirIssues(cs)).toEqual([]);
    expect(cs.url).toBe(ISOBAR_CODE_SYSTEM);
    expect(cs.content).toBe('complete');
    expect(cs.count).toBe(cs.concept!.length);
  });
  it('holds exactly the concepts the mapping uses, with the same display', () => {
    expect(cs.concept!.map((c) => [c.code, c.display])).toEqual(Object.values(localConcepts).map((c) => [c.code, c.display]));
    expect(new Set(cs.concept!.map((c) => c.code)).size).toBe(cs.concept!.length);
  });
});
