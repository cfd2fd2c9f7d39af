import type { Coding } from 'fhir/r4';
import type { PatientClass } from '../shared/coding/schema';
import type { Endotype, VasoreactivityOutcome } from '../shared/physiology/types';
import type { VesselCode } from '../shared/physiology/schema';

/**
 * Code systems, codes and identifier systems of the report bundle. Each standard code names the
 * published table it comes from; everything without a standard code lives in Isobar's own
 * CodeSystem (`coronary-physiology.codesystem.json`, canonical URL `ISOBAR_CODE_SYSTEM`).
 */

export const LOINC = 'http://loinc.org';
export const SNOMED = 'http://snomed.info/sct';
export const UCUM = 'http://unitsofmeasure.org';
export const DICOM_DCM = 'http://dicom.nema.org/resources/ontology/DCM';
export const V2_0074 = 'http://terminology.hl7.org/CodeSystem/v2-0074';
export const V3_INTERPRETATION = 'http://terminology.hl7.org/CodeSystem/v3-ObservationInterpretation';
export const V3_ACT_CODE = 'http://terminology.hl7.org/CodeSystem/v3-ActCode';
export const OBSERVATION_CATEGORY = 'http://terminology.hl7.org/CodeSystem/observation-category';
export const US_CORE_DIAGNOSTIC_REPORT_NOTE =
  'http://hl7.org/fhir/us/core/StructureDefinition/us-core-diagnosticreport-note';

/** Canonical URL of Isobar's own CodeSystem (stable: receivers may store codes against it). */
export const ISOBAR_CODE_SYSTEM = 'https://isobar.example/fhir/CodeSystem/coronary-physiology';

/** Identifier systems Isobar assigns values in. */
export const IDENTIFIER_SYSTEMS = {
  /** The signed report (the same across its versions: an addendum updates the same DiagnosticReport). */
  report: 'https://isobar.example/fhir/sid/report',
  /** One measured index of one vessel of a report, or a study-level result (stable across versions). */
  observation: 'https://isobar.example/fhir/sid/observation',
  /** One version of a report as sent: a resend of the same version carries the same value. */
  bundle: 'https://isobar.example/fhir/sid/report-version',
  /** SHA-256 of the signed PDF, hex: the fingerprint printed on the report. */
  pdfSha256: 'https://isobar.example/fhir/sid/report-pdf-sha256',
} as const;

/** DiagnosticReport.category: cardiac catheterization, HL7 v2 table 0074 (FHIR R4 diagnostic service sections). */
export const categoryCardiacCath: Coding = { system: V2_0074, code: 'CTH', display: 'Cardiac Catheterization' };
/** DiagnosticReport.category: LOINC part LP29708-2 Cardiology (US Core DiagnosticReport note category). */
export const categoryCardiology: Coding = { system: LOINC, code: 'LP29708-2', display: 'Cardiology' };
/** DiagnosticReport.code: LOINC 18745-0 Cardiac catheterization study (C-CDA on FHIR value sets). */
export const codeCardiacCathStudy: Coding = { system: LOINC, code: '18745-0', display: 'Cardiac catheterization study' };
/** Observation.category: "procedure" (FHIR R4 observation-category). */
export const categoryProcedure: Coding = { system: OBSERVATION_CATEGORY, code: 'procedure', display: 'Procedure' };

/** Observation.interpretation codes used (HL7 v3 ObservationInterpretation, FHIR R4 code system). */
export const interpretation = {
  normal: { system: V3_INTERPRETATION, code: 'N', display: 'Normal' },
  abnormal: { system: V3_INTERPRETATION, code: 'A', display: 'Abnormal' },
  low: { system: V3_INTERPRETATION, code: 'L', display: 'Low' },
  high: { system: V3_INTERPRETATION, code: 'H', display: 'High' },
  /** "results are borderline and can neither be declared positive / negative nor …" */
  equivocal: { system: V3_INTERPRETATION, code: 'E', display: 'Equivocal' },
} as const satisfies Record<string, Coding>;

/** Encounter.class (HL7 v3 ActCode, FHIR R4 v3-ActEncounterCode). */
export const encounterClass = {
  inpatient: { system: V3_ACT_CODE, code: 'IMP', display: 'inpatient encounter' },
  outpatient: { system: V3_ACT_CODE, code: 'AMB', display: 'ambulatory' },
} as const satisfies Record<PatientClass, Coding>;

/** A concept of Isobar's CodeSystem. */
export interface LocalConcept {
  code: string;
  display: string;
  definition: string;
}

const c = (code: string, display: string, definition: string): LocalConcept => ({ code, display, definition });

/**
 * Every concept of Isobar's CodeSystem. The shipped JSON resource holds exactly these (a test keeps
 * them equal); codes are never reused for another meaning.
 */
export const localConcepts = {
  // Indices (Observation.code)
  ffr: c('ffr', 'Fractional flow reserve', 'Mean distal coronary pressure / mean aortic pressure at maximal hyperaemia (pressure wire).'),
  restingPdPa: c('resting-pd-pa', 'Whole-cycle Pd/Pa at rest', 'Mean distal coronary pressure / mean aortic pressure over the whole cardiac cycle at rest, computed from the resting pressures.'),
  nhprWholeCycle: c('nhpr-whole-cycle', 'Whole-cycle resting ratio', 'A non-hyperaemic pressure ratio over the whole cardiac cycle, as read from the console.'),
  nhprDiastolic: c('nhpr-diastolic', 'Diastolic resting ratio', 'A non-hyperaemic pressure ratio over the diastolic period, as read from the console.'),
  nhprFullCycleMinimum: c('nhpr-full-cycle-minimum', 'Full-cycle minimum resting ratio', 'The lowest Pd/Pa over the whole cardiac cycle at rest, as read from the console.'),
  cfr: c('cfr', 'Coronary flow reserve (thermodilution)', 'Mean transit time at rest / mean transit time at hyperaemia (bolus thermodilution).'),
  imr: c('imr', 'Index of microcirculatory resistance', 'Distal pressure × mean transit time at hyperaemia (U = mmHg·s); the corrected value when a correction applies (see the method).'),
  imrUncorrected: c('imr-uncorrected', 'Index of microcirculatory resistance, uncorrected', 'Pd × Tmn at hyperaemia before any correction for collateral flow.'),
  rrr: c('rrr', 'Resistive reserve ratio', '(Tmn rest / Tmn hyperaemia) × (Pd rest / Pd hyperaemia).'),
  mrr: c('mrr', 'Microvascular resistance reserve', '(CFR / FFR) × (Pa rest / Pa hyperaemia).'),
  visualStenosis: c('visual-stenosis', 'Visual diameter stenosis', 'Angiographic diameter stenosis of the vessel, estimated visually, in percent.'),
  acetylcholineTest: c('acetylcholine-test', 'Acetylcholine provocation test result', 'The result of intracoronary acetylcholine testing for coronary vasomotor disorders (COVADIS criteria).'),
  endotype: c('endotype', 'Coronary endotype', 'The diagnosis of the coronary function test: obstructive, microvascular angina, vasospastic angina, both, or none.'),
  // Methods (Observation.method)
  methodPressureDerived: c('method-pressures', 'Computed from mean pressures', 'The ratio was computed from the mean pressures recorded in the study.'),
  methodConsoleValue: c('method-console', 'Read from the console', 'The value was read from the pressure-wire console and entered.'),
  methodBolusThermodilution: c('method-bolus-thermodilution', 'Bolus thermodilution', 'Mean transit times from room-temperature saline bolus injections.'),
  imrPdTmn: c('imr-pd-tmn', 'IMR as Pd × Tmn', 'Uncorrected: hyperaemic distal pressure × hyperaemic mean transit time.'),
  imrWedge: c('imr-wedge', 'IMR corrected with coronary wedge pressure', 'Pa × Tmn × (Pd − Pw) / (Pa − Pw) (Layland et al., Heart 2012).'),
  imrYong: c('imr-yong', 'IMR corrected without wedge pressure', 'Pa × Tmn × (1.35 × Pd/Pa − 0.32), for a vessel with FFR at or below the cut-off and no wedge pressure (Yong et al.).'),
  // Acetylcholine results (value of acetylcholine-test)
  achEpicardialSpasm: c('ach-epicardial-spasm', 'Epicardial spasm', '≥ 90% vasoconstriction with reproduction of the usual symptoms and ischaemic ECG changes.'),
  achMicrovascularSpasm: c('ach-microvascular-spasm', 'Microvascular spasm', 'Usual symptoms and ischaemic ECG changes without ≥ 90% epicardial constriction.'),
  achEndothelialDysfunction: c('ach-endothelial-dysfunction', 'Endothelial dysfunction', 'Constriction without the criteria of spasm.'),
  achEquivocal: c('ach-equivocal', 'Equivocal acetylcholine test', 'Incomplete criteria of spasm (e.g. constriction with only one of symptoms or ECG changes).'),
  achNegative: c('ach-negative', 'Negative acetylcholine test', 'No spasm and no significant constriction.'),
  // Endotypes (value of endotype, DiagnosticReport.conclusionCode)
  endotypeObstructive: c('endotype-obstructive', 'Obstructive coronary disease', 'An epicardial pressure index at or below its cut-off.'),
  endotypeMicrovascular: c('endotype-microvascular-angina', 'Microvascular angina', 'Coronary microvascular dysfunction without obstructive disease.'),
  endotypeVasospastic: c('endotype-vasospastic-angina', 'Vasospastic angina', 'Epicardial spasm on acetylcholine testing without obstructive disease.'),
  endotypeMixed: c('endotype-mixed', 'Microvascular and vasospastic angina', 'Microvascular dysfunction together with epicardial spasm.'),
  endotypeNone: c('endotype-no-abnormality', 'No coronary abnormality', 'Epicardial index, CFR and IMR within thresholds and a negative acetylcholine test.'),
  endotypeInconclusive: c('endotype-inconclusive', 'Inconclusive', 'No endotype could be assigned: the protocol is incomplete, a result is in doubt, or the findings (such as endothelial dysfunction alone) fit none of the endotypes.'),
} as const;

export type LocalConceptKey = keyof typeof localConcepts;

export function localCoding(key: LocalConceptKey): Coding {
  const concept = localConcepts[key];
  return { system: ISOBAR_CODE_SYSTEM, code: concept.code, display: concept.display };
}

export const acetylcholineResultConcept: Readonly<Record<VasoreactivityOutcome, LocalConceptKey>> = {
  'epicardial-spasm': 'achEpicardialSpasm',
  'microvascular-spasm': 'achMicrovascularSpasm',
  'endothelial-dysfunction': 'achEndothelialDysfunction',
  equivocal: 'achEquivocal',
  negative: 'achNegative',
};

export const endotypeConcept: Readonly<Record<Endotype, LocalConceptKey>> = {
  obstructive: 'endotypeObstructive',
  'microvascular-angina': 'endotypeMicrovascular',
  'vasospastic-angina': 'endotypeVasospastic',
  mixed: 'endotypeMixed',
  'no-abnormality': 'endotypeNone',
  inconclusive: 'endotypeInconclusive',
};

/**
 * Observation.bodySite per vessel, SNOMED CT codes of DICOM PS3.16: CID 3016 (major coronary
 * arteries), CID 3014 (coronary artery segments) and CID 3015 (coronary arteries: posterolateral
 * branch, graft). A diagonal branch has codes only by its number (first, second, third diagonal), which
 * the record does not hold: it is sent as its parent artery with the branch as text.
 * The posterior descending and posterolateral branches are coded as branches of the right coronary
 * artery, as the product treats them (right-coronary acetylcholine doses).
 */
export const vesselBodySite: Readonly<Record<VesselCode, { code: string; display: string; branchOfParent?: true }>> = {
  LM: { code: '3227004', display: 'Left main coronary artery' },
  LAD: { code: '59438005', display: 'Left anterior descending coronary artery' },
  LCX: { code: '57396003', display: 'Circumflex coronary artery' },
  RCA: { code: '13647002', display: 'Right coronary artery' },
  RAMUS: { code: '244252004', display: 'Intermediate artery (ramus)' },
  DIAGONAL: { code: '59438005', display: 'Left anterior descending coronary artery', branchOfParent: true },
  OBTUSE_MARGINAL: { code: '22765000', display: 'Marginal coronary artery' },
  PDA: { code: '53655008', display: 'Posterior descending right coronary artery' },
  PLB: { code: '17269004', display: 'Posterolateral branch of right coronary artery' },
  GRAFT: { code: '264293000', display: 'Coronary artery graft' },
};

/** FFR in SNOMED CT (DICOM PS3.16 CID 3621, pressure ratios). */
export const snomedFfr: Coding = { system: SNOMED, code: '371842003', display: 'Fractional flow reserve' };
/** CFR in DICOM (PS3.16 CID 3620, hemodynamic ratios). */
export const dicomCfr: Coding = { system: DICOM_DCM, code: '122217', display: 'Coronary Flow reserve' };
/** LOINC 80915-2: percent stenosis of a coronary artery segment (LOINC listing); sent without a display. */
export const loincPercentStenosis: Coding = { system: LOINC, code: '80915-2' };
