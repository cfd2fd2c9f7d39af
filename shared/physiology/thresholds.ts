import { z } from 'zod';

/** The lab's cut-offs. Every default below carries its source in `thresholdSources`. */
export interface Thresholds {
  /** FFR abnormal when ≤ value. */
  ffr: number;
  /** Whole-cycle Pd/Pa at rest (computed from resting pressures), abnormal when ≤ value. */
  restingPdPa: number;
  /** Entered whole-cycle resting ratio, abnormal when ≤ value. */
  nhprWholeCycle: number;
  /** Entered diastolic resting ratio, abnormal when ≤ value. */
  nhprDiastolic: number;
  /** Entered full-cycle minimum resting ratio, abnormal when ≤ value. */
  nhprFullCycleMinimum: number;
  /** CFR abnormal when < value. */
  cfr: number;
  /**
   * CFR borderline when cfr ≤ value < max(cfr, cfrBorderline). Off by default (equal to `cfr`); a lab
   * that wants 2.0–2.5 flagged (ESC 2024 uses < 2.5) sets it to 2.5.
   */
  cfrBorderline: number;
  /** IMR abnormal when ≥ value (U, mmHg·s). */
  imr: number;
  /** RRR abnormal when < value. */
  rrr: number;
  /** MRR abnormal when < value. */
  mrr: number;
  /** MRR borderline when mrr ≥ the MRR cut-off and ≤ value (normal above it). */
  mrrBorderline: number;
  /**
   * Lower edge of the FFR grey zone (FFR from this value up to the FFR cut-off, both included, judged at
   * the display precision): a note only. Default 0.76: the band 0.76–0.80.
   */
  ffrGreyZoneLow: number;
  /** Drift check: Pd/Pa at the guide tip after pull-back should lie in [driftLow, driftHigh]. */
  driftLow: number;
  driftHigh: number;
  /** An injection straying from the mean of the other injections by more than this fraction. */
  injectionSpread: number;
  /** Injections expected per thermodilution set. */
  minInjections: number;
  /** Epicardial spasm needs constriction ≥ this percentage (with symptoms and ischaemic ECG). */
  spasmConstrictionPct: number;
  /** Constriction ≥ this percentage that is not spasm counts as endothelial dysfunction. */
  endothelialDysfunctionPct: number;
  /** Acetylcholine bolus into the left coronary above this (µg) is accepted with a warning. */
  achMaxMicrograms: number;
  /** Acetylcholine bolus into the right coronary (RCA, PDA, PLB) above this (µg) is accepted with a warning. */
  achMaxMicrogramsRight: number;
  /** A vessel without a pressure index is obstructive at a visual diameter stenosis ≥ this (%). */
  obstructiveStenosisPct: number;
  /** Pd above Pa by more than this (mmHg) is warned about. */
  pdAbovePaToleranceMmHg: number;
  /** Hyperaemic Pd/Pa above resting Pd/Pa by more than this is warned about. */
  hyperemicAboveRestingTolerance: number;
  /** Any Pd/Pa, FFR or resting ratio above this is accepted with a warning. */
  pdPaMaxPlausible: number;
}

export type ThresholdKey = keyof Thresholds;

export const defaultThresholds: Readonly<Thresholds> = Object.freeze({
  ffr: 0.8,
  restingPdPa: 0.91,
  nhprWholeCycle: 0.91,
  nhprDiastolic: 0.89,
  nhprFullCycleMinimum: 0.89,
  cfr: 2.0,
  cfrBorderline: 2.0,
  imr: 25,
  rrr: 2.0,
  mrr: 2.1,
  mrrBorderline: 2.7,
  ffrGreyZoneLow: 0.76,
  driftLow: 0.98,
  driftHigh: 1.02,
  injectionSpread: 0.3,
  minInjections: 3,
  spasmConstrictionPct: 90,
  endothelialDysfunctionPct: 20,
  achMaxMicrograms: 200,
  achMaxMicrogramsRight: 50,
  obstructiveStenosisPct: 50,
  pdAbovePaToleranceMmHg: 2,
  hyperemicAboveRestingTolerance: 0.02,
  pdPaMaxPlausible: 1.05,
});

/** Which side of a cut-off is abnormal: at or below it, below it, or at or above it. */
export type CutOffRule = 'atOrBelow' | 'below' | 'atOrAbove';

/**
 * The rule of each index's cut-off, judged at the displayed precision: the analysis applies it, the
 * report prints it and the FHIR reference range states it. A borderline upper limit's rule says
 * whether the band reaches it: the CFR band stops below its limit, the MRR band includes it.
 */
export const cutOffRule = Object.freeze({
  ffr: 'atOrBelow',
  restingPdPa: 'atOrBelow',
  nhprWholeCycle: 'atOrBelow',
  nhprDiastolic: 'atOrBelow',
  nhprFullCycleMinimum: 'atOrBelow',
  cfr: 'below',
  cfrBorderline: 'below',
  imr: 'atOrAbove',
  rrr: 'below',
  mrr: 'below',
  mrrBorderline: 'atOrBelow',
} as const satisfies Partial<Record<ThresholdKey, CutOffRule>>);
export type CutOffKey = keyof typeof cutOffRule;
/** The indices judged against a cut-off (not the borderline limits). */
export type IndexCutOffKey = Exclude<CutOffKey, 'cfrBorderline' | 'mrrBorderline'>;
export const indexCutOffKeys: readonly IndexCutOffKey[] = ['ffr', 'restingPdPa', 'nhprWholeCycle', 'nhprDiastolic', 'nhprFullCycleMinimum', 'cfr', 'imr', 'rrr', 'mrr'];
/** The symbol a rule is printed with before its cut-off. */
export const cutOffSymbol: Readonly<Record<CutOffRule, string>> = Object.freeze({ atOrBelow: '≤', below: '<', atOrAbove: '≥' });
/** The precision an index's cut-off is judged at: IMR a whole number, the others ratios. */
export const cutOffKind = (key: CutOffKey): 'imr' | 'ratio' => (key === 'imr' ? 'imr' : 'ratio');

/** Where each default comes from ([memory] = recalled, not confirmed; [practice] = common practice). */
export const thresholdSources: Readonly<Record<ThresholdKey, string>> = Object.freeze({
  ffr: 'ESC 2024 chronic coronary syndromes guideline; EAPCI 2020 consensus on INOCA; FAME',
  restingPdPa: 'CONTRAST (0.91); RESOLVE (0.92)',
  nhprWholeCycle: 'CONTRAST (0.91); RESOLVE (0.92)',
  nhprDiastolic:
    'DEFINE-FLAIR and the SWEDEHEART-based randomised trial, both 2017; EAPCI 2020 applies ≤ 0.89 to NHPRs as a class',
  nhprFullCycleMinimum:
    'validation studies summarised in an Open Heart review; EAPCI 2020 applies ≤ 0.89 to NHPRs as a class',
  cfr: 'EAPCI 2020 (2.0 for thermodilution); COVADIS ≤ 2.0–2.5',
  cfrBorderline: 'off by default (same as the CFR cut-off); a lab may raise it to 2.5 — ESC 2024 chronic coronary syndromes guideline (< 2.5); COVADIS ≤ 2.0–2.5',
  imr: 'ESC 2024; EAPCI 2020; COVADIS writes > 25',
  rrr: '[memory: CorMicA] cut-off; formula from Lee et al., JAHA 2020',
  mrr: 'de Vos et al., JACC Cardiovasc Interv 2023;16(4):470–481 (continuous thermodilution: < 2.1 rules in); De Bruyne et al. 2021 (formula)',
  mrrBorderline:
    'de Vos et al., JACC Cardiovasc Interv 2023;16(4):470–481 (continuous thermodilution: > 2.7 rules out); the cut-off for bolus thermodilution is not settled (ILIAS, EHJ 2023, found 3.0)',
  ffrGreyZoneLow: 'DEFER/FAME history, Interv Cardiol Rev 2016 (grey zone 0.76–0.80, judged at two decimals)',
  driftLow:
    '[memory] 0.98–1.02 window; drift > 2 mmHg means repeat (interventional cardiology textbook; Cook et al., Circ Cardiovasc Interv 2016)',
  driftHigh:
    '[memory] 0.98–1.02 window; drift > 2 mmHg means repeat (interventional cardiology textbook; Cook et al., Circ Cardiovasc Interv 2016)',
  injectionSpread: '[memory] repeat an injection whose transit time differs from the others by more than ~30%',
  minInjections: '[memory] three injections at rest and three at hyperaemia',
  spasmConstrictionPct: 'COVADIS (Beltrame et al., EHJ 2017; Ong et al., IJC 2018); ESC 2024',
  endothelialDysfunctionPct: 'COVADIS classification of acetylcholine responses (Beltrame et al., EHJ 2017; Ong et al., IJC 2018) as the lab applies it; the 20% figure [memory]',
  achMaxMicrograms: 'ESC 2024 protocol figure (2, 20, 100, 200 µg into the left coronary)',
  achMaxMicrogramsRight: 'Japanese Circulation Society 2016 (20, 50 µg into the right coronary); ESC 2024',
  obstructiveStenosisPct: 'COVADIS (Ong et al., Int J Cardiol 2018): non-obstructive is < 50% diameter stenosis or FFR > 0.80',
  pdAbovePaToleranceMmHg: '[practice] about 2 mmHg, the usual drift allowance',
  hyperemicAboveRestingTolerance: '[practice] resting ratios by different methods differ by 0.01–0.02',
  pdPaMaxPlausible: '[practice] Pd/Pa reads 1.00 after equalizing; well above 1 suggests drift or a pressure error',
});

/** Short citations used inside reason sentences. */
export const thresholdCitations: Readonly<Record<ThresholdKey, string>> = Object.freeze({
  ffr: 'ESC 2024',
  restingPdPa: 'CONTRAST',
  nhprWholeCycle: 'CONTRAST',
  nhprDiastolic: 'DEFINE-FLAIR; EAPCI 2020',
  nhprFullCycleMinimum: 'Open Heart review; EAPCI 2020',
  cfr: 'EAPCI 2020',
  cfrBorderline: 'ESC 2024',
  imr: 'ESC 2024; EAPCI 2020',
  // Recalled, not confirmed from a published source: said so wherever the cut-off is cited.
  rrr: 'cut-off source not confirmed',
  mrr: 'de Vos 2023',
  mrrBorderline: 'de Vos 2023',
  ffrGreyZoneLow: 'DEFER/FAME',
  // Recalled windows that labs apply widely; the source is not confirmed, and the citation says so.
  driftLow: 'common practice; source not confirmed',
  driftHigh: 'common practice; source not confirmed',
  injectionSpread: 'common practice; source not confirmed',
  minInjections: 'common practice; source not confirmed',
  spasmConstrictionPct: 'COVADIS; ESC 2024',
  endothelialDysfunctionPct: 'common practice; source not confirmed',
  achMaxMicrograms: 'ESC 2024 protocol',
  achMaxMicrogramsRight: 'JCS 2016',
  obstructiveStenosisPct: 'COVADIS',
  pdAbovePaToleranceMmHg: 'common practice',
  hyperemicAboveRestingTolerance: 'common practice',
  pdPaMaxPlausible: 'common practice',
});

/** Each setting's label and unit, as forms and error messages name it. */
export const thresholdLabels: Readonly<Record<ThresholdKey, [label: string, unit: string]>> = {
  ffr: ['FFR cut-off', '(ratio)'],
  restingPdPa: ['Resting whole-cycle Pd/Pa cut-off', '(ratio)'],
  nhprWholeCycle: ['Whole-cycle resting ratio cut-off', '(ratio)'],
  nhprDiastolic: ['Diastolic resting ratio cut-off', '(ratio)'],
  nhprFullCycleMinimum: ['Full-cycle minimum resting ratio cut-off', '(ratio)'],
  cfr: ['CFR cut-off', '(ratio)'],
  cfrBorderline: ['CFR borderline upper limit', '(ratio)'],
  imr: ['IMR cut-off', 'U (mmHg·s)'],
  rrr: ['RRR cut-off', '(ratio)'],
  mrr: ['MRR cut-off', '(ratio)'],
  mrrBorderline: ['MRR borderline upper limit', '(ratio)'],
  ffrGreyZoneLow: ['FFR grey-zone lower limit', '(ratio)'],
  driftLow: ['Drift lower limit', '(ratio)'],
  driftHigh: ['Drift upper limit', '(ratio)'],
  injectionSpread: ['Injection spread', '(fraction, e.g. 0.30)'],
  minInjections: ['Minimum injections', '(count)'],
  spasmConstrictionPct: ['Spasm constriction', '%'],
  endothelialDysfunctionPct: ['Endothelial dysfunction constriction', '%'],
  achMaxMicrograms: ['Acetylcholine maximum dose, left coronary', 'µg'],
  achMaxMicrogramsRight: ['Acetylcholine maximum dose, right coronary', 'µg'],
  obstructiveStenosisPct: ['Obstructive visual stenosis', '%'],
  pdAbovePaToleranceMmHg: ['Pd above Pa tolerance', 'mmHg'],
  hyperemicAboveRestingTolerance: ['Hyperaemic above resting tolerance', '(ratio)'],
  pdPaMaxPlausible: ['Maximum plausible Pd/Pa', '(ratio)'],
};

function thresholdValue(key: ThresholdKey) {
  const [label, unit] = thresholdLabels[key];
  const tolerance = key === 'pdAbovePaToleranceMmHg' || key === 'hyperemicAboveRestingTolerance';
  const finite = z.number({ error: `${label} must be a finite number ${unit}.` });
  let s = tolerance
    ? finite.gte(0, { error: `${label} must be 0 ${unit} or more.` }).lte(20, { error: `${label} must be at most 20 ${unit}.` })
    : finite.gt(0, { error: `${label} must be greater than 0 ${unit}.` });
  if (key === 'minInjections') s = s.int({ error: `${label} must be a whole number ${unit}.` });
  if (key === 'spasmConstrictionPct' || key === 'endothelialDysfunctionPct' || key === 'obstructiveStenosisPct') {
    s = s.lte(100, { error: `${label} must be at most 100 %.` });
  }
  return s.optional();
}

const keys = Object.keys(defaultThresholds) as ThresholdKey[];

export const thresholdsSchema = z.strictObject(
  Object.fromEntries(keys.map((k) => [k, thresholdValue(k)])) as Record<
    ThresholdKey,
    ReturnType<typeof thresholdValue>
  >,
  {
    error: (iss) =>
      iss.code === 'unrecognized_keys'
        ? `Unknown threshold setting(s): ${(iss.keys as string[]).join(', ')}.`
        : 'Thresholds must be an object of numeric settings.',
  },
);

/** Merge the lab's partial settings over the defaults (input already validated). */
export function resolveThresholds(partial: Partial<Thresholds> | undefined): Thresholds {
  if (partial === undefined) return defaultThresholds as Thresholds;
  const out = { ...defaultThresholds };
  for (const k of keys) {
    const v = partial[k];
    if (v !== undefined) out[k] = v;
  }
  return out;
}

/** Citation for a reason sentence: the source when the default is in use, else the lab's setting. */
export function cite(t: Thresholds, key: ThresholdKey): string {
  return t[key] === defaultThresholds[key] ? thresholdCitations[key] : 'lab setting';
}
