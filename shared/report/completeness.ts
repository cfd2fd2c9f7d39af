import type { SectionName, StudySections } from '../study/schema';

/**
 * Completeness of a study before it can be signed. Every missing item is returned at once, each with
 * the form path of the field that fixes it (`vessels/2/driftPdPa`), so the screen can list them all
 * and link each one to its field, and the sign button can say why it is disabled.
 *
 * Fields that the form gains over time (`driftNotDoneReason` on a vessel, `complicationKinds` on the
 * findings) are read through optional access: a record without them is judged by what it has.
 */

export type MissingCode =
  | 'indication'
  | 'clinical-question'
  | 'operator'
  | 'no-vessel'
  | 'vessel-measurement'
  | 'drift-check'
  | 'dose-field'
  | 'complications'
  | 'complication-details'
  | 'impression'
  | 'plan';

export interface MissingItem {
  code: MissingCode;
  /** The section of the form that holds the field. */
  section: SectionName;
  /** Slash-separated path of the field in the study record, e.g. `vessels/2/driftPdPa`. */
  path: string;
  /** The same path as the form library names the field, e.g. `vessels.2.driftPdPa`. */
  field: string;
  /** One plain sentence saying what is missing and where. */
  message: string;
}

export interface CompletenessResult {
  complete: boolean;
  missing: MissingItem[];
}

/** The study sections that the checks read (the full record also fits). */
export type CompletenessInput = Pick<StudySections, 'details' | 'vessels' | 'vasoreactivity' | 'findings'>;

/** Fields the checks read that not every version of the record carries yet. */
interface LaterVesselFields {
  driftNotDoneReason?: string | null;
}
interface LaterFindingsFields {
  complicationKinds?: readonly string[];
}

const filled = (s: string | null | undefined): boolean => typeof s === 'string' && s.trim().length > 0;
const num = (v: number | null | undefined): v is number => typeof v === 'number' && Number.isFinite(v);

/** A vessel row's short name for messages ("vessel 2 (LAD)"). */
function vesselName(index: number, code: string): string {
  return `vessel ${index + 1} (${code})`;
}

/** Whether the row carries a pressure index: resting or hyperaemic pressures, a console FFR or a resting ratio. */
export function hasPressureIndex(v: StudySections['vessels'][number]): boolean {
  return (
    (num(v.restPa) && num(v.restPd)) ||
    (num(v.hyperemiaPa) && num(v.hyperemiaPd)) ||
    num(v.consoleFfr) ||
    (v.nhprKind !== null && num(v.nhprValue))
  );
}

/** Whether the row carries any measurement: a pressure index, or thermodilution transit times. */
function hasMeasurement(v: StudySections['vessels'][number]): boolean {
  return hasPressureIndex(v) || v.restTransit.some(num) || v.hyperemiaTransit.some(num);
}

const doseFields = [
  ['micrograms', 'the dose in µg'],
  ['constrictionPct', 'the diameter reduction'],
  ['symptoms', 'whether the usual symptoms were reproduced'],
  ['ischemicEcg', 'whether the ECG showed ischaemic changes'],
] as const;

/**
 * Every item that must be recorded before the study can be signed: an indication, the clinical
 * question and the operator; at least one vessel, each with a measurement; for each vessel with a
 * pressure index, a drift check or the reason it was not done; each acetylcholine dose with its
 * observations; complications recorded (an explicit "none" counts, an empty field does not); the
 * physician's impression and plan.
 */
export function checkCompleteness(study: CompletenessInput): CompletenessResult {
  const missing: MissingItem[] = [];
  const add = (code: MissingCode, section: SectionName, path: string, message: string) =>
    missing.push({ code, section, path, field: path.split('/').join('.'), message });

  const d = study.details;
  if (!filled(d.indication)) add('indication', 'details', 'details/indication', 'Indication: say why the study was done.');
  if (d.clinicalQuestion === null) add('clinical-question', 'details', 'details/clinicalQuestion', 'Clinical question: choose what the study had to answer.');
  if (d.operatorId === null) add('operator', 'details', 'details/operatorId', 'Operator: choose the physician who did the procedure.');

  if (study.vessels.length === 0) {
    add('no-vessel', 'vessels', 'vessels', 'Vessels: record at least one assessed vessel.');
  }
  study.vessels.forEach((v, i) => {
    const name = vesselName(i, v.vessel);
    if (!hasMeasurement(v)) {
      add('vessel-measurement', 'vessels', `vessels/${i}/restPa`, `Measurements: ${name} has no measurement (pressures, a console FFR, a resting ratio or transit times).`);
    }
    if (hasPressureIndex(v)) {
      const reason = (v as LaterVesselFields).driftNotDoneReason;
      if (!num(v.driftPdPa) && !filled(reason)) {
        add('drift-check', 'vessels', `vessels/${i}/driftPdPa`, `Drift check: ${name} needs the Pd/Pa at the guide tip after pull-back, or the reason it was not done.`);
      }
    }
  });

  study.vasoreactivity.doses.forEach((dose, j) => {
    const gaps = doseFields.filter(([key]) => dose[key] === null || dose[key] === undefined);
    for (const [key, words] of gaps) {
      add('dose-field', 'vasoreactivity', `vasoreactivity/doses/${j}/${key}`, `Acetylcholine dose ${j + 1} (${dose.vessel}): record ${words}.`);
    }
  });

  const f = study.findings;
  const kinds = (f as LaterFindingsFields).complicationKinds;
  if (Array.isArray(kinds)) {
    if (kinds.length === 0) {
      add('complications', 'findings', 'findings/complicationKinds', 'Complications: record them, or choose "None".');
    } else if (kinds.includes('other') && !filled(f.complications)) {
      add('complication-details', 'findings', 'findings/complications', 'Complications: describe the complication marked "Other".');
    }
  } else if (!filled(f.complications)) {
    add('complications', 'findings', 'findings/complications', 'Complications: record them, or write "None".');
  }
  if (!filled(f.impression)) add('impression', 'findings', 'findings/impression', 'Impression: write the conclusion of the study.');
  if (!filled(f.plan)) add('plan', 'findings', 'findings/plan', 'Plan: write the recommendation that follows.');

  return { complete: missing.length === 0, missing };
}

/**
 * What stands between the study and its signature, as the report screen, the study's report pane and
 * a refused signature say it: "3 items are missing before the report can be signed."; null when none is.
 */
export function missingSummary(result: Pick<CompletenessResult, 'missing'>): string | null {
  const n = result.missing.length;
  if (n === 0) return null;
  return `${n} ${n === 1 ? 'item is' : 'items are'} missing before the report can be signed.`;
}
