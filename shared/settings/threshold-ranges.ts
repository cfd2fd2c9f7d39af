import { z } from 'zod';
import { defaultThresholds, thresholdLabels, thresholdSources, type ThresholdKey, type Thresholds } from '../physiology/thresholds';

/**
 * How far the lab may move each cut-off, and in what steps. The bounds span the values published
 * sources use (named in `basis`); where the trade has no single source the bounds are common practice
 * ([practice]) or recalled ([memory]). A value outside them is refused with the field named.
 */
export interface ThresholdRange {
  min: number;
  max: number;
  /** Smallest step: ratios at the two decimals they are judged and printed at, percentages whole. */
  step: number;
  basis: string;
}

export const thresholdRanges: Readonly<Record<ThresholdKey, ThresholdRange>> = Object.freeze({
  ffr: { min: 0.75, max: 0.8, step: 0.01, basis: 'DEFER used 0.75; FAME and ESC 2024 use 0.80' },
  restingPdPa: { min: 0.89, max: 0.93, step: 0.01, basis: 'CONTRAST 0.91, RESOLVE 0.92; [practice] ±0.02 around them' },
  nhprWholeCycle: { min: 0.89, max: 0.93, step: 0.01, basis: 'CONTRAST 0.91, RESOLVE 0.92; [practice] ±0.02 around them' },
  nhprDiastolic: { min: 0.86, max: 0.92, step: 0.01, basis: 'DEFINE-FLAIR 0.89; [practice] ±0.03 around it' },
  nhprFullCycleMinimum: { min: 0.86, max: 0.92, step: 0.01, basis: 'Open Heart review and EAPCI 2020 0.89; [practice] ±0.03 around it' },
  cfr: { min: 2.0, max: 2.5, step: 0.01, basis: 'EAPCI 2020 (2.0 for thermodilution); COVADIS ≤ 2.0–2.5; ESC 2024 (< 2.5)' },
  cfrBorderline: { min: 2.0, max: 2.5, step: 0.01, basis: 'COVADIS ≤ 2.0–2.5; ESC 2024 (< 2.5)' },
  imr: { min: 20, max: 40, step: 1, basis: '[practice] 25 in ESC 2024 and EAPCI 2020; 40 is the prognostic cut-off after STEMI' },
  rrr: { min: 1.5, max: 3.0, step: 0.01, basis: '[practice] around the 2.0 cut-off [memory: CorMicA]' },
  mrr: { min: 2.0, max: 3.0, step: 0.01, basis: 'de Vos et al. 2023 (2.1, continuous thermodilution); ILIAS, EHJ 2023 (3.0, bolus)' },
  mrrBorderline: { min: 2.1, max: 3.0, step: 0.01, basis: 'de Vos et al. 2023 (2.7); ILIAS, EHJ 2023 (3.0)' },
  ffrGreyZoneLow: { min: 0.7, max: 0.8, step: 0.01, basis: 'DEFER/FAME history, Interv Cardiol Rev 2016 (grey zone 0.76–0.80); [practice] width' },
  driftLow: { min: 0.95, max: 1.0, step: 0.01, basis: '[practice] about ±2 mmHg drift (Cook et al. 2016); 0.98 [memory]' },
  driftHigh: { min: 1.0, max: 1.05, step: 0.01, basis: '[practice] about ±2 mmHg drift (Cook et al. 2016); 1.02 [memory]' },
  injectionSpread: { min: 0.1, max: 0.5, step: 0.01, basis: '[practice] around the ~30% spread [memory]' },
  minInjections: { min: 2, max: 5, step: 1, basis: '[practice] three injections per set [memory]' },
  spasmConstrictionPct: { min: 75, max: 100, step: 1, basis: 'COVADIS (≥ 90%); [practice] lower bound' },
  endothelialDysfunctionPct: { min: 10, max: 50, step: 1, basis: '[practice] around 20% [memory]' },
  achMaxMicrograms: { min: 50, max: 200, step: 1, basis: 'ESC 2024 protocol (2, 20, 100, 200 µg into the left coronary)' },
  achMaxMicrogramsRight: { min: 20, max: 80, step: 1, basis: 'Japanese Circulation Society 2016 (20, 50 µg); [memory] up to 80 µg' },
  obstructiveStenosisPct: { min: 50, max: 70, step: 1, basis: 'COVADIS (50%); [practice] 70% for a severe stenosis' },
  pdAbovePaToleranceMmHg: { min: 0, max: 5, step: 0.5, basis: '[practice] about 2 mmHg' },
  hyperemicAboveRestingTolerance: { min: 0, max: 0.05, step: 0.01, basis: '[practice] resting ratios by different methods differ by 0.01–0.02' },
  pdPaMaxPlausible: { min: 1.0, max: 1.15, step: 0.01, basis: '[practice] Pd/Pa reads 1.00 after equalizing' },
});

export const thresholdKeys = Object.keys(defaultThresholds) as ThresholdKey[];

const decimalsOf = (step: number) => (Number.isInteger(step) ? 0 : String(step).split('.')[1].length);
const fmt = (n: number, step: number) => n.toFixed(decimalsOf(step));
const onStep = (v: number, step: number) => Math.abs(v / step - Math.round(v / step)) < 1e-6;

function rangedValue(key: ThresholdKey) {
  const [label, unit] = thresholdLabels[key];
  const r = thresholdRanges[key];
  const between = `between ${fmt(r.min, r.step)} and ${fmt(r.max, r.step)} ${unit}`;
  return z
    .number({ error: `${label} must be a number ${between}.` })
    .min(r.min, { error: `${label} must be ${between} (${r.basis}).` })
    .max(r.max, { error: `${label} must be ${between} (${r.basis}).` })
    .refine((v) => onStep(v, r.step), { error: `${label} must be given in steps of ${fmt(r.step, r.step)} ${unit}.` });
}

/** Some or all cut-offs; those left out keep the value in force at the new set's effective date. */
export const thresholdValuesSchema = z.strictObject(
  Object.fromEntries(thresholdKeys.map((k) => [k, rangedValue(k).optional()])) as Record<ThresholdKey, z.ZodOptional<ReturnType<typeof rangedValue>>>,
  {
    error: (iss) =>
      iss.code === 'unrecognized_keys' ? `Unknown threshold(s): ${(iss.keys as string[]).join(', ')}.` : 'values must be an object of cut-offs.',
  },
);

/** A new set of thresholds: the values, and from when they judge studies signed. */
export const thresholdSetRequestSchema = z.strictObject({
  values: thresholdValuesSchema,
  /**
   * A date (YYYY-MM-DD: from the start of that day in the lab's time zone; today means now) or a time
   * (ISO 8601 with offset). Absent: now. Never earlier than now: signed reports were judged by the
   * set in force when they were signed, so the past is not rewritten.
   */
  effectiveFrom: z.union([z.iso.date(), z.iso.datetime({ offset: true })], { error: 'effectiveFrom must be a date (YYYY-MM-DD) or a time with its offset.' }).optional(),
  note: z.string({ error: 'note must be text.' }).trim().max(500, { error: 'The note is too long (at most 500 characters).' }).nullable().optional(),
});
export type ThresholdSetRequest = z.infer<typeof thresholdSetRequestSchema>;

/** Cut-offs that only make sense together; each problem names the field to correct. */
export function thresholdRelationProblems(t: Thresholds): Array<{ key: ThresholdKey; message: string }> {
  const out: Array<{ key: ThresholdKey; message: string }> = [];
  if (t.ffrGreyZoneLow > t.ffr) out.push({ key: 'ffrGreyZoneLow', message: `FFR grey-zone lower limit (${t.ffrGreyZoneLow}) must not be above the FFR cut-off (${t.ffr}).` });
  if (t.driftLow >= t.driftHigh) out.push({ key: 'driftHigh', message: `Drift upper limit (${t.driftHigh}) must be above the drift lower limit (${t.driftLow}).` });
  if (t.mrrBorderline < t.mrr) out.push({ key: 'mrrBorderline', message: `MRR borderline upper limit (${t.mrrBorderline}) must not be below the MRR cut-off (${t.mrr}).` });
  if (t.endothelialDysfunctionPct >= t.spasmConstrictionPct) {
    out.push({ key: 'endothelialDysfunctionPct', message: `Endothelial dysfunction constriction (${t.endothelialDysfunctionPct} %) must be below the spasm constriction (${t.spasmConstrictionPct} %).` });
  }
  return out;
}

/** Where a value comes from, as the admin screen and the report show it. */
export function thresholdSourceOf(key: ThresholdKey, value: number): { source: string; published: boolean } {
  return value === defaultThresholds[key] ? { source: thresholdSources[key], published: true } : { source: 'lab setting', published: false };
}

/** One row of the admin's threshold table. */
export interface ThresholdRow {
  key: ThresholdKey;
  label: string;
  unit: string;
  value: number;
  defaultValue: number;
  /** The published source of the default, or "lab setting" when the lab's value differs from it. */
  source: string;
  defaultSource: string;
  range: ThresholdRange;
}

export interface ThresholdSetSummary {
  id: number;
  effectiveFrom: string;
  /** Values that differ from the published defaults. */
  overrides: Partial<Thresholds>;
  note: string | null;
  createdBy: string | null;
  createdAt: string;
}

export interface ThresholdOverview {
  /** Every cut-off with the value in force now and where it comes from. */
  rows: ThresholdRow[];
  inForce: { setId: number | null; effectiveFrom: string | null };
  /** Sets that take effect later. */
  scheduled: ThresholdSetSummary[];
  /** Every set, newest effective date first. */
  history: ThresholdSetSummary[];
}

/** GET /api/settings/thresholds: the thresholds in force, as the server's analysis and the live form use them. */
export interface ThresholdsInForce {
  /** The lab's values where they differ from the published defaults. */
  overrides: Partial<Thresholds>;
  /** Every threshold the analysis uses: defaults with the overrides applied. */
  values: Thresholds;
  /** The set in force, or null when the published defaults are used. */
  setId: number | null;
  effectiveFrom: string | null;
}
