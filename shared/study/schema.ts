import { z } from 'zod';
import { MAX_MICROGRAMS, MAX_PRESSURE, MAX_RATIO, MAX_TRANSIT, nhprKinds, vesselCodes } from '../physiology/schema';
import {
  accessSites,
  clinicalQuestions,
  decisions,
  doseUnits,
  drugRoutes,
  hyperemicAgents,
  pullbackPatterns,
  sexes,
  wirePositions,
  type StudyState,
} from './vocabulary';

/**
 * The study record: one schema per section, used by the form (zodResolver), the API (parse at the
 * edge) and the database mapping. A draft may be incomplete, so measurements are nullable, but a
 * value that is present must be possible: the same hard limits as the physiology core.
 */
const quantity = (label: string, unit: string, min: number, max: number, { minExclusive = false } = {}) => {
  const u = unit ? ` ${unit}` : '';
  const n = z.number({ error: `${label} must be a number${unit ? ` in ${unit}` : ''}.` });
  return (minExclusive ? n.gt(min, { error: `${label} must be more than ${min}${u}.` }) : n.gte(min, { error: `${label} must be at least ${min}${u}.` }))
    .lte(max, { error: `${label} must be at most ${max}${u}.` })
    .nullable();
};
const pressure = (label: string) => quantity(label, 'mmHg', 0, MAX_PRESSURE, { minExclusive: true });
const ratio = (label: string) => quantity(label, '', 0, MAX_RATIO, { minExclusive: true });
const text = (label: string, max = 2000) => z.string({ error: `${label} must be text.` }).trim().max(max, { error: `${label} is too long (at most ${max} characters).` }).nullable();
const choice = <T extends readonly [string, ...string[]]>(label: string, values: T) =>
  z.enum(values, { error: `${label}: choose one of the listed options.` }).nullable();
const yesNo = (label: string) => z.boolean({ error: `${label}: answer yes or no.` }).nullable();
const transitTimes = (label: string) =>
  z
    .array(z.number({ error: `${label} must be a number in s.` }).gt(0, { error: `${label} must be more than 0 s.` }).lte(MAX_TRANSIT, { error: `${label} must be at most ${MAX_TRANSIT} s.` }), {
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
    guideFrench: z.number({ error: 'Guide catheter size must be a number in French.' }).int({ error: 'Guide catheter size must be a whole number of French.' }).min(4, { error: 'Guide catheter size must be at least 4 French.' }).max(8, { error: 'Guide catheter size must be at most 8 French.' }).nullable(),
});
const endAfterStart = (d: Partial<z.infer<typeof detailsFields>>) => !d.procedureStartedAt || !d.procedureEndedAt || d.procedureEndedAt >= d.procedureStartedAt;
export const detailsSchema = detailsFields.refine(endAfterStart, {
  path: ['procedureEndedAt'],
  error: 'Procedure end must be after its start.',
});

export type Details = z.infer<typeof detailsSchema>;

export const setupSchema = z.object({
  transducerZeroed: yesNo('Transducer zeroed at heart level'),
  nitratesGiven: yesNo('Nitrates before wiring'),
  nitrateDoseMicrograms: quantity('Nitrate dose', 'µg', 0, 2000),
  equalizedInAorta: yesNo('Pressures equalized in the aorta'),
  introducerRemoved: yesNo('Introducer removed before equalizing'),
  wirePosition: choice('Wire position', wirePositions),
  hyperemicAgent: choice('Hyperaemic agent', hyperemicAgents),
  hyperemicRoute: choice('Hyperaemic route', drugRoutes),
  hyperemicDose: quantity('Hyperaemic dose', '', 0, 20000),
  hyperemicDoseUnit: choice('Hyperaemic dose unit', doseUnits),
  heparinUnits: quantity('Heparin', 'U', 0, 50000),
});
export type Setup = z.infer<typeof setupSchema>;

export const vesselAssessmentSchema = z.object({
  id: z.uuid({ error: 'Vessel row id must be a UUID.' }),
  vessel: z.enum(vesselCodes, { error: 'Vessel: choose one of the listed vessels.' }),
  segment: z.number({ error: 'Segment must be a number.' }).int().min(1, { error: 'Segment must be 1–18.' }).max(18, { error: 'Segment must be 1–18.' }).nullable(),
  visualStenosisPct: quantity('Visual stenosis', '%', 0, 100),
  restPa: pressure('Resting Pa'),
  restPd: pressure('Resting Pd'),
  hyperemiaPa: pressure('Hyperaemic Pa'),
  hyperemiaPd: pressure('Hyperaemic Pd'),
  consoleFfr: ratio('FFR from the console'),
  nhprKind: choice('Resting ratio kind', nhprKinds),
  nhprValue: ratio('Resting ratio'),
  wedgePressure: quantity('Coronary wedge pressure', 'mmHg', 0, MAX_PRESSURE),
  driftPdPa: ratio('Drift check Pd/Pa'),
  restTransit: transitTimes('Resting transit time'),
  hyperemiaTransit: transitTimes('Hyperaemic transit time'),
  pullbackPattern: choice('Pull-back pattern', pullbackPatterns),
  decision: choice('Decision', decisions),
});
export type VesselAssessment = z.infer<typeof vesselAssessmentSchema>;

export const acetylcholineDoseSchema = z.object({
  id: z.uuid({ error: 'Dose row id must be a UUID.' }),
  vessel: z.enum(vesselCodes, { error: 'Vessel: choose one of the listed vessels.' }),
  micrograms: quantity('Acetylcholine dose', 'µg', 0, MAX_MICROGRAMS, { minExclusive: true }),
  constrictionPct: quantity('Diameter reduction', '%', 0, 100),
  symptoms: yesNo('Usual symptoms reproduced'),
  ischemicEcg: yesNo('Ischaemic ECG changes'),
});
export type AcetylcholineDose = z.infer<typeof acetylcholineDoseSchema>;

export const vasoreactivitySchema = z.object({
  doses: z.array(acetylcholineDoseSchema).max(12, { error: 'At most 12 doses.' }),
  nitrateReversal: yesNo('Spasm reversed with nitrates'),
});
export type Vasoreactivity = z.infer<typeof vasoreactivitySchema>;

export const findingsSchema = z.object({
  complications: text('Complications', 2000),
  contrastMl: quantity('Contrast', 'mL', 0, 2000),
  fluoroscopyMinutes: quantity('Fluoroscopy time', 'min', 0, 600),
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
  guideFrench: null,
});

export const emptySetup = (): Setup => ({
  transducerZeroed: null,
  nitratesGiven: null,
  nitrateDoseMicrograms: null,
  equalizedInAorta: null,
  introducerRemoved: null,
  wirePosition: null,
  hyperemicAgent: null,
  hyperemicRoute: null,
  hyperemicDose: null,
  hyperemicDoseUnit: null,
  heparinUnits: null,
});

export const emptyFindings = (): Findings => ({ complications: null, contrastMl: null, fluoroscopyMinutes: null, impression: null, plan: null });

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
});
