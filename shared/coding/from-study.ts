import { z } from 'zod';
import { vesselCodes } from '../physiology/schema';
import type { Findings, PhysiologyResult } from '../physiology/types';
import type { StudySections } from '../study/schema';
import { billingContexts, interventionKinds, patientClasses, settings, stentTypes, type CodingInput, type MeasuredIndex } from './schema';
import { localDate } from '../time/local-date';
import { listNames, shortName } from './vessels';

/**
 * What a study records for coding, beyond the physiology: the encounter, the diagnostic
 * catheterization of the same session and the interventions. Nothing has a silent default: `null`
 * means "not recorded yet", and the suggestions then say so.
 */
const choice = <T extends readonly [string, ...string[]]>(label: string, values: T) =>
  z.enum(values, { error: `${label}: choose one of the listed options.` }).nullable();
const tick = (label: string) => z.boolean({ error: `${label}: answer yes or no.` });

const studyInterventionSchema = z.object({
  id: z.uuid({ error: 'Intervention row id must be a UUID.' }),
  vessel: z.enum(vesselCodes, { error: 'Vessel: choose one of the listed vessels.' }),
  kind: z.enum(interventionKinds, { error: 'Intervention: choose balloon, stent, atherectomy or atherectomy with stent.' }),
  branch: tick('A branch of the major vessel'),
  stent: choice('Stent type', stentTypes),
});

export const studyCodingSchema = z.object({
  patientClass: choice('Patient class', patientClasses),
  billing: choice('Billing context', billingContexts),
  setting: choice('Setting', settings),
  /** Was a diagnostic catheterization done in the same session ('none' is an answer; null is not yet). */
  diagnosticCath: choice('Diagnostic catheterization', ['done', 'none'] as const),
  coronaryAngiography: tick('Coronary angiography'),
  leftHeart: tick('Left heart catheterization'),
  leftVentriculography: tick('Left ventriculography'),
  rightHeart: tick('Right heart catheterization'),
  graftAngiography: tick('Bypass graft angiography'),
  interventions: z.array(studyInterventionSchema).max(20, { error: 'At most 20 interventions.' }),
  /** Angina documented by the physician; null when not stated. */
  angina: z.boolean({ error: 'Angina: answer yes or no.' }).nullable(),
});
export type StudyCoding = z.infer<typeof studyCodingSchema>;

export const emptyStudyCoding = (): StudyCoding => ({
  patientClass: null,
  billing: null,
  setting: null,
  diagnosticCath: null,
  coronaryAngiography: false,
  leftHeart: false,
  leftVentriculography: false,
  rightHeart: false,
  graftAngiography: false,
  interventions: [],
  angina: null,
});

type Note = NonNullable<CodingInput['notes']>[number];

const present = (v: number | null | undefined): v is number => typeof v === 'number' && Number.isFinite(v);

/**
 * The coding input of a study: its coding section, its vessels and doses, and the physiology
 * analysis of the same record (`analyzeStudy(toPhysiologyInput(record))`). What had to be inferred
 * travels with the input as notes, which `suggestCodes` shows the coder as warnings.
 */
export function toCodingInput(
  record: Pick<StudySections, 'details' | 'setup' | 'vessels' | 'vasoreactivity'> & { coding: StudyCoding },
  analysis: PhysiologyResult,
  options: { timeZone?: string } = {},
): CodingInput {
  const coding = studyCodingSchema.parse(record.coding);
  const notes: Note[] = [];

  let cath: CodingInput['cath'] = null;
  if (coding.diagnosticCath === null) {
    notes.push({ code: 'cath-not-recorded', message: 'Whether a diagnostic catheterization was done in this session is not recorded; no catheterization code was suggested. Record it in the study (or "none").', blocking: true });
  } else if (coding.diagnosticCath === 'done') {
    cath = {
      coronaryAngiography: coding.coronaryAngiography,
      leftHeart: coding.leftHeart,
      rightHeart: coding.rightHeart,
      graftAngiography: coding.graftAngiography,
      leftVentriculography: coding.leftHeart && coding.leftVentriculography,
    };
  }

  const pci = coding.interventions.map((i) => ({
    vessel: i.vessel,
    kind: i.kind,
    ...(i.branch ? { branch: true } : {}),
    ...(i.stent !== null && (i.kind === 'stent' || i.kind === 'atherectomy-stent') ? { stent: i.stent } : {}),
  }));

  // A hyperaemic drug counts for a vessel when the study's agent was given (any agent but "none")
  // and that vessel has hyperaemic measurements.
  const agent = record.setup.hyperemicAgent;
  const agentGiven = agent !== null && agent !== 'none';
  const byId = new Map(analysis.vessels.map((v) => [v.id, v]));
  const physiology: CodingInput['physiology'] = [];
  const agentUnknown: string[] = [];
  const agentNone: string[] = [];
  for (const row of record.vessels) {
    const r = byId.get(row.id);
    if (!r) continue;
    const measured: MeasuredIndex[] = [];
    if (r.ffr !== undefined) measured.push('ffr');
    if (r.nhpr !== undefined || r.restingPdPa !== undefined) measured.push('nhpr');
    if (r.cfr !== undefined) measured.push('cfr');
    if (r.imr !== undefined) measured.push('imr');
    if (measured.length === 0) continue;
    const hyperaemicData =
      (present(row.hyperemiaPa) && present(row.hyperemiaPd)) || present(row.consoleFfr) || row.hyperemiaTransit.some(present);
    if (hyperaemicData && agent === null) agentUnknown.push(shortName(row.vessel));
    if (hyperaemicData && agent === 'none') agentNone.push(shortName(row.vessel));
    physiology.push({ vessel: row.vessel, measured, hyperemicAgent: agentGiven && hyperaemicData });
  }
  if (agentUnknown.length) {
    notes.push({ code: 'hyperemic-agent-not-recorded', message: `Hyperaemic measurements are recorded in ${listNames([...new Set(agentUnknown)])} but the hyperaemic agent is not; they were treated as measured without a hyperaemic drug. Record the agent in the study.` });
  }
  if (agentNone.length) {
    notes.push({ code: 'hyperemic-agent-none', message: `Hyperaemic measurements are recorded in ${listNames([...new Set(agentNone)])} but the study says no hyperaemic agent was given; they were treated as measured without a hyperaemic drug. Check the study.` });
  }

  const undecided = record.vessels.filter((v) => v.decision === 'pci');
  const treated = new Set(coding.interventions.map((i) => i.vessel));
  const missingPci = undecided.filter((v) => !treated.has(v.vessel)).map((v) => shortName(v.vessel));
  if (missingPci.length) {
    notes.push({ code: 'pci-decision-without-intervention', message: `The decision for ${listNames([...new Set(missingPci)])} is "treat", but no intervention is recorded there. If it was done in this session, record it; if staged, ignore this.` });
  }

  const doses = record.vasoreactivity.doses.filter((d) => present(d.micrograms));
  const doseVessels = [...new Set(doses.map((d) => d.vessel))];
  const vasoreactivity: CodingInput['vasoreactivity'] = doses.length ? { agent: 'acetylcholine', vessel: doses[0].vessel } : null;
  if (doseVessels.length > 1) {
    notes.push({ code: 'provocation-several-vessels', message: `Acetylcholine was given into ${listNames(doseVessels.map(shortName))}.` });
  }

  const f = analysis.findings;
  // The coding section's answer first, then the study form's angina field, then the clinical question.
  let angina = coding.angina ?? record.details.anginaPresent ?? null;
  if (angina === null) {
    angina = record.details.clinicalQuestion === 'angina-no-obstruction';
    notes.push({
      code: 'angina-inferred',
      message: angina
        ? 'Angina is recorded neither in the coding section nor in the study; it was taken from the clinical question (angina with no obstructive disease). Confirm it in the physician\'s documentation.'
        : 'Angina is recorded neither in the coding section nor in the study and was taken as absent. If the physician documents angina, the diagnosis codes change.',
    });
  }
  if (f.endothelialDysfunction) {
    notes.push({ code: 'endothelial-dysfunction', message: 'Endothelial dysfunction on acetylcholine testing has no specific ICD-10-CM code of its own; no code was suggested for it [memory].' });
  }

  return {
    billing: coding.billing,
    setting: coding.setting,
    patientClass: coding.patientClass,
    cath,
    pci,
    physiology,
    vasoreactivity,
    diagnoses: {
      obstructiveCad: f.obstructive,
      angina,
      // Dysfunction whether or not its type could be decided; an analysis stored before the field
      // existed had a subtype for every finding it made.
      microvascularDysfunction: (f as Partial<Findings>).microvascularDysfunction ?? f.microvascular !== null,
      vasospasm: f.vasospasm,
    },
    // The lab's calendar day, not UTC's: it picks the code-set release and is the claim's date.
    dateOfService: record.details.procedureStartedAt ? localDate(record.details.procedureStartedAt, options.timeZone ?? 'UTC') : null,
    ...(notes.length ? { notes } : {}),
  };
}
