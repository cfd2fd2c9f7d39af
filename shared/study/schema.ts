import { z } from 'zod';
import { MAX_MICROGRAMS, MAX_PRESSURE, MAX_RATIO, MAX_TRANSIT, MIN_POSITIVE, nhprKinds, vesselCodes } from '../physiology/schema';
import {
  accessSites,
  anginaCharacters,
  clinicalQuestions,
  complicationKinds,
  nitrateTimings,
  rhythms,
  segmentCodes,
  spasmPatterns,
  decisions,
  doseUnits,
  drugRoutes,
  hyperemicAgents,
  pullbackPatterns,
  sexes,
  timiFlowGrades,
  wirePositions,
  type StudyState,
} from './vocabulary';
import { emptyStudyCoding, studyCodingSchema } from '../coding/from-study';

/**
 * The study record: one schema per section, used by the form (zodResolver), the API (parse at the
 * edge) and the database mapping. A draft may be incomplete, so measurements are nullable, but a
 * value that is present must be possible: the same hard limits as the physiology core (its
 * MIN_POSITIVE floor and MAX_* ceilings), so whatever a save accepts can be analysed.
 */
const quantity = (label: string, unit: string, min: number, max: number, { minExclusive = false } = {}) => {
  const u = unit ? ` ${unit}` : '';
  const n = z.number({ error: `${label} must be a number${unit ? ` in ${unit}` : ''}.` });
  return (minExclusive ? n.gt(min, { error: `${label} must be more than ${min}${u}.` }) : n.gte(min, { error: `${label} must be at least ${min}${u}.` }))
    .lte(max, { error: `${label} must be at most ${max}${u}.` })
    .nullable();
};
const pressure = (label: string) => quantity(label, 'mmHg', MIN_POSITIVE, MAX_PRESSURE);
const ratio = (label: string) => quantity(label, '', MIN_POSITIVE, MAX_RATIO);
const whole = (label: string, unit: string, min: number, max: number) =>
  z
    .number({ error: `${label} must be a number${unit ? ` in ${unit}` : ''}.` })
    .int({ error: `${label} must be a whole number.` })
    .gte(min, { error: `${label} must be at least ${min}${unit ? ` ${unit}` : ''}.` })
    .lte(max, { error: `${label} must be at most ${max}${unit ? ` ${unit}` : ''}.` })
    .nullable();
const text = (label: string, max = 2000) => z.string({ error: `${label} must be text.` }).trim().max(max, { error: `${label} is too long (at most ${max} characters).` }).nullable();
const choice = <T extends readonly [string, ...string[]]>(label: string, values: T) =>
  z.enum(values, { error: `${label}: choose one of the listed options.` }).nullable();
const yesNo = (label: string) => z.boolean({ error: `${label}: answer yes or no.` }).nullable();
const transitTimes = (label: string) =>
  z
    .array(z.number({ error: `${label} must be a number in s.` }).gte(MIN_POSITIVE, { error: `${label} must be at least ${MIN_POSITIVE} s.` }).lte(MAX_TRANSIT, { error: `${label} must be at most ${MAX_TRANSIT} s.` }), {
      error: `${label}s must be a list.`,
    })
    .max(10, { error: `At most 10 injections per set.` });

export const patientSchema = z.object({
  mrn: z.string({ error: 'MRN is required.' }).trim().min(1, { error: 'MRN is required.' }).max(40, { error: 'MRN is too long.' }),
  familyName: z.string({ error: 'Family name is required.' }).trim().min(1, { error: 'Family name is required.' }).max(100),
  givenName: z.string({ error: 'Given name is required.' }).trim().min(1, { error: 'Given name is required.' }).max(100),
  birthDate: z.iso.date({ error: 'Birth date must be a date (YYYY-MM-DD).' }).refine((d) => d >= '1900-01-01' && d <= new Date().toISOString().slice(0, 10), {
    error: 'Birth date must be between 1900 and today.',
  }),
  sex: z.enum(sexes, { error: 'Sex: choose one of the listed options.' }),
});
export type Patient = z.infer<typeof patientSchema>;

const dateTime = (label: string) => z.iso.datetime({ offset: true, error: `${label} must be a date and time.` }).nullable();

const detailsFields = z.object({
    encounter: text('Encounter', 60),
    procedureStartedAt: dateTime('Procedure start'),
    procedureEndedAt: dateTime('Procedure end'),
    operatorId: z.uuid({ error: 'Operator: choose a physician from the list.' }).nullable(),
    referringName: text('Referring clinician', 120),
    referringEmail: z.email({ error: 'Referring clinician e-mail must be an e-mail address.' }).nullable(),
    indication: text('Indication', 1000),
    clinicalQuestion: choice('Clinical question', clinicalQuestions),
    accessSite: choice('Access site', accessSites),
    weightKg: quantity('Weight', 'kg', 2, 350),
    heightCm: quantity('Height', 'cm', 40, 250),
    anginaPresent: yesNo('Angina'),
    anginaCharacter: choice('Angina character', anginaCharacters),
    guideFrench: z.number({ error: 'Guide catheter size must be a number in French.' }).int({ error: 'Guide catheter size must be a whole number of French.' }).min(4, { error: 'Guide catheter size must be at least 4 French.' }).max(8, { error: 'Guide catheter size must be at most 8 French.' }).nullable(),
});
// Compared as instants: "10:00+02:00" is before "09:00Z", whatever the strings say.
const endAfterStart = (d: Partial<z.infer<typeof detailsFields>>) =>
  !d.procedureStartedAt || !d.procedureEndedAt || Date.parse(d.procedureEndedAt) >= Date.parse(d.procedureStartedAt);
export const detailsSchema = detailsFields.refine(endAfterStart, {
  path: ['procedureEndedAt'],
  error: 'Procedure end must be after its start.',
});

export type Details = z.infer<typeof detailsSchema>;

export const setupSchema = z.object({
  transducerZeroed: yesNo('Transducer zeroed at heart level'),
  nitratesGiven: yesNo('Nitroglycerin given'),
  nitrateTiming: choice('When nitroglycerin was given', nitrateTimings),
  nitrateDoseMicrograms: quantity('Nitroglycerin dose', 'µg', 0, 2000),
  equalizedInAorta: yesNo('Pressures equalized in the aorta'),
  introducerRemoved: yesNo('Introducer removed before equalizing'),
  wirePosition: choice('Wire position', wirePositions),
  hyperemicAgent: choice('Hyperaemic agent', hyperemicAgents),
  hyperemicRoute: choice('Hyperaemic route', drugRoutes),
  hyperemicDose: quantity('Hyperaemic dose', '', 0, 20000),
  hyperemicDoseUnit: choice('Hyperaemic dose unit', doseUnits),
  heparinUnits: quantity('Heparin', 'U', 0, 50000),
  baselineHeartRate: whole('Baseline heart rate', 'bpm', 20, 250),
  baselineSystolic: whole('Baseline systolic pressure', 'mmHg', 40, 300),
  baselineDiastolic: whole('Baseline diastolic pressure', 'mmHg', 10, 200),
  baselineRhythm: choice('Baseline rhythm', rhythms),
  lvedp: quantity('LVEDP', 'mmHg', 0, 80),
});
export type Setup = z.infer<typeof setupSchema>;

export const vesselAssessmentSchema = z.object({
  id: z.uuid({ error: 'Vessel row id must be a UUID.' }),
  vessel: z.enum(vesselCodes, { error: 'Vessel: choose one of the listed vessels.' }),
  segment: choice('Segment', segmentCodes),
  visualStenosisPct: quantity('Visual stenosis', '%', 0, 100),
  restPa: pressure('Resting Pa'),
  restPd: pressure('Resting Pd'),
  hyperemiaPa: pressure('Hyperaemic Pa'),
  hyperemiaPd: pressure('Hyperaemic Pd'),
  consoleFfr: ratio('FFR from the console'),
  nhprKind: choice('Resting ratio kind', nhprKinds),
  nhprValue: ratio('Resting ratio'),
  wedgePressure: pressure('Coronary wedge pressure'),
  driftPdPa: ratio('Drift check Pd/Pa'),
  driftNotDoneReason: text('Why the drift check was not done', 300),
  timiFlow: z.union(timiFlowGrades.map((g) => z.literal(g)), { error: 'TIMI flow: choose a grade 0–3.' }).nullable(),
  correctedFrameCount: quantity('Corrected frame count', 'frames', 1, 200),
  restTransit: transitTimes('Resting transit time'),
  hyperemiaTransit: transitTimes('Hyperaemic transit time'),
  pullbackPattern: choice('Pull-back pattern', pullbackPatterns),
  decision: choice('Decision', decisions),
});
export type VesselAssessment = z.infer<typeof vesselAssessmentSchema>;

export const acetylcholineDoseSchema = z.object({
  id: z.uuid({ error: 'Dose row id must be a UUID.' }),
  vessel: z.enum(vesselCodes, { error: 'Vessel: choose one of the listed vessels.' }),
  micrograms: quantity('Acetylcholine dose', 'µg', MIN_POSITIVE, MAX_MICROGRAMS),
  constrictionPct: quantity('Diameter reduction', '%', 0, 100),
  symptoms: yesNo('Usual symptoms reproduced'),
  ischemicEcg: yesNo('Ischaemic ECG changes'),
  heartRate: whole('Heart rate', 'bpm', 20, 250),
  systolic: whole('Systolic pressure', 'mmHg', 40, 300),
  diastolic: whole('Diastolic pressure', 'mmHg', 10, 200),
  rhythm: choice('Rhythm', rhythms),
  /** Where constriction was seen, which may differ from where the drug was injected (`vessel`). */
  spasmVessel: z.enum(vesselCodes, { error: 'Spasm seen in: choose one of the listed vessels.' }).nullable(),
  spasmSegment: choice('Spasm segment', segmentCodes),
  spasmPattern: choice('Spasm pattern', spasmPatterns),
});
export type AcetylcholineDose = z.infer<typeof acetylcholineDoseSchema>;

export const vasoreactivitySchema = z.object({
  doses: z.array(acetylcholineDoseSchema).max(12, { error: 'At most 12 doses.' }),
  nitrateReversal: yesNo('Spasm reversed with nitroglycerin'),
  reversalNitroglycerinMicrograms: quantity('Nitroglycerin after the test', 'µg', 0, 2000),
  reversalNitroglycerinAt: dateTime('Nitroglycerin given at'),
});
export type Vasoreactivity = z.infer<typeof vasoreactivitySchema>;

export const findingsSchema = z.object({
  /** Empty = not recorded yet; "none" is its own choice and stands alone. */
  complicationKinds: z
    .array(z.enum(complicationKinds, { error: 'Complication: choose one of the listed kinds.' }), { error: 'Complications must be a list.' })
    .max(complicationKinds.length)
    .refine((kinds) => new Set(kinds).size === kinds.length, { error: 'Each complication is listed once.' })
    .refine((kinds) => !kinds.includes('none') || kinds.length === 1, { error: '“None” cannot be chosen together with a complication.' }),
  complications: text('Complication details', 2000),
  contrastMl: quantity('Contrast', 'mL', 0, 2000),
  fluoroscopyMinutes: quantity('Fluoroscopy time', 'min', 0, 600),
  airKermaMGy: quantity('Air kerma', 'mGy', 0, 50000),
  doseAreaProductGyCm2: quantity('Dose-area product', 'Gy·cm²', 0, 5000),
  impression: text('Impression', 5000),
  plan: text('Plan', 5000),
});
export type Findings = z.infer<typeof findingsSchema>;

/** The editable sections of a study, as the form holds them and PATCH replaces them. */
export const studySectionsSchema = z.object({
  patient: patientSchema,
  details: detailsSchema,
  setup: setupSchema,
  vessels: z.array(vesselAssessmentSchema).max(12, { error: 'At most 12 vessels per study.' }).superRefine((rows, ctx) => {
    const seen = new Set<string>();
    rows.forEach((r, i) => {
      if (seen.has(r.id)) ctx.addIssue({ code: 'custom', path: [i, 'id'], message: 'Each vessel row needs its own id.' });
      seen.add(r.id);
    });
  }),
  vasoreactivity: vasoreactivitySchema,
  findings: findingsSchema,
  /** What coding needs beyond the physiology: encounter, diagnostic catheterization, interventions. */
  coding: studyCodingSchema,
});
export type StudySections = z.infer<typeof studySectionsSchema>;
export type SectionName = keyof StudySections;
export const sectionNames = Object.keys(studySectionsSchema.shape) as SectionName[];

/** POST /api/studies: a patient and whatever is known of the case so far. */
export const createStudySchema = z.object({
  patient: patientSchema,
  /** Whatever is known of the case so far; the rest stays empty. */
  details: detailsFields.partial().refine(endAfterStart, { path: ['procedureEndedAt'], error: 'Procedure end must be after its start.' }).optional(),
});
export type CreateStudy = z.infer<typeof createStudySchema>;

/** PATCH /api/studies/:id: the version it was read at, and whole sections to replace. */
export const patchStudySchema = studySectionsSchema.partial().extend({
  version: z.number({ error: 'version is required: the version of the study you edited.' }).int().min(1),
});
export type PatchStudy = z.infer<typeof patchStudySchema>;

/** The study as the API returns it. */
export interface StudyRecord extends StudySections {
  id: string;
  accession: string;
  state: StudyState;
  version: number;
  createdAt: string;
  updatedAt: string;
  attachments: AttachmentSummary[];
}

export interface AttachmentSummary {
  id: string;
  fileName: string;
  mediaType: string;
  sizeBytes: number;
  sha256: string;
  uploadedAt: string;
  uploadedBy: string | null;
}

export const emptyDetails = (): Details => ({
  encounter: null,
  procedureStartedAt: null,
  procedureEndedAt: null,
  operatorId: null,
  referringName: null,
  referringEmail: null,
  indication: null,
  clinicalQuestion: null,
  accessSite: null,
  weightKg: null,
  heightCm: null,
  anginaPresent: null,
  anginaCharacter: null,
  guideFrench: null,
});

export const emptySetup = (): Setup => ({
  transducerZeroed: null,
  nitratesGiven: null,
  nitrateTiming: null,
  nitrateDoseMicrograms: null,
  equalizedInAorta: null,
  introducerRemoved: null,
  wirePosition: null,
  hyperemicAgent: null,
  hyperemicRoute: null,
  hyperemicDose: null,
  hyperemicDoseUnit: null,
  heparinUnits: null,
  baselineHeartRate: null,
  baselineSystolic: null,
  baselineDiastolic: null,
  baselineRhythm: null,
  lvedp: null,
});

export const emptyFindings = (): Findings => ({
  complicationKinds: [],
  complications: null,
  contrastMl: null,
  fluoroscopyMinutes: null,
  airKermaMGy: null,
  doseAreaProductGyCm2: null,
  impression: null,
  plan: null,
});

export const emptyVessel = (id: string, vessel: VesselAssessment['vessel']): VesselAssessment => ({
  id,
  vessel,
  segment: null,
  visualStenosisPct: null,
  restPa: null,
  restPd: null,
  hyperemiaPa: null,
  hyperemiaPd: null,
  consoleFfr: null,
  nhprKind: null,
  nhprValue: null,
  wedgePressure: null,
  driftPdPa: null,
  driftNotDoneReason: null,
  timiFlow: null,
  correctedFrameCount: null,
  restTransit: [],
  hyperemiaTransit: [],
  pullbackPattern: null,
  decision: null,
});

export const emptyDose = (id: string, vessel: AcetylcholineDose['vessel']): AcetylcholineDose => ({
  id,
  vessel,
  micrograms: null,
  constrictionPct: null,
  symptoms: null,
  ischemicEcg: null,
  heartRate: null,
  systolic: null,
  diastolic: null,
  rhythm: null,
  spasmVessel: null,
  spasmSegment: null,
  spasmPattern: null,
});

export { emptyStudyCoding };

export const emptyVasoreactivity = (): Vasoreactivity => ({
  doses: [],
  nitrateReversal: null,
  reversalNitroglycerinMicrograms: null,
  reversalNitroglycerinAt: null,
});
