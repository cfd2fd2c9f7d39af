import { cutPlain, cutRatio } from './format';
import { notUsedClause } from './not-used';
import { cite, defaultThresholds, resolveThresholds, type ThresholdKey, type Thresholds } from './thresholds';

/**
 * The thresholds of one analysis with the fixed parts of the reason sentences (cut-off and source),
 * built once per set of thresholds rather than once per vessel.
 */
export interface Ctx {
  t: Thresholds;
  /** Sentence tails, each following a vessel label and a value. */
  ffrAbnormal: string;
  ffrGreyZone: string;
  ffrCut: string;
  restAbnormal: Record<'restingPdPa' | 'nhprWholeCycle' | 'nhprDiastolic' | 'nhprFullCycleMinimum', string>;
  imrAbnormal: string;
  cfrAbnormal: string;
  /** Qualifiers (no final stop) for an index in a vessel where no microvascular finding is drawn. */
  notUsedObstructed: string;
  notUsedUnexcluded: string;
  cfrBorderline: string;
  /** RRR and MRR sentence parts, without the final stop (a qualifier may follow). */
  rrrAbnormal: string;
  mrrAbnormal: string;
  mrrBorderline: string;
  /** How MRR was measured here (a clause for the end of an MRR sentence). */
  mrrMethod: string;
  stenosisObstructive: string;
  stenosisCut: string;
}

function build(t: Thresholds): Ctx {
  const rest = (key: ThresholdKey) =>
    ` is at or below the ${cutRatio(t[key])} cut-off (${cite(t, key)}) with no FFR measured — a haemodynamically significant stenosis.`;
  const mrrMethod =
    `MRR here comes from bolus thermodilution, while its cut-offs were set with continuous thermodilution (${cite(t, 'mrr')}); the bolus cut-off is not settled`;
  return {
    t,
    ffrAbnormal: ` is at or below the ${cutRatio(t.ffr)} cut-off (${cite(t, 'ffr')}) — a haemodynamically significant stenosis.`,
    ffrGreyZone: ` lies in the ${cutRatio(t.ffrGreyZoneLow)}–${cutRatio(t.ffr)} grey zone (${cite(t, 'ffrGreyZoneLow')}); the flag stays abnormal — weigh it with the clinical picture.`,
    ffrCut: cutRatio(t.ffr),
    restAbnormal: {
      restingPdPa: rest('restingPdPa'),
      nhprWholeCycle: rest('nhprWholeCycle'),
      nhprDiastolic: rest('nhprDiastolic'),
      nhprFullCycleMinimum: rest('nhprFullCycleMinimum'),
    },
    imrAbnormal: ` is at or above the ${cutPlain(t.imr)} cut-off (${cite(t, 'imr')}) — raised microvascular resistance`,
    cfrAbnormal: ` is below the ${cutRatio(t.cfr)} cut-off (${cite(t, 'cfr')}) — impaired coronary flow reserve`,
    notUsedObstructed: notUsedClause('obstructive'),
    notUsedUnexcluded: notUsedClause('not-excluded'),
    cfrBorderline: ` is in the borderline band ${cutRatio(t.cfr)}–${cutRatio(t.cfrBorderline)} (${cite(t, 'cfr')} uses ${cutRatio(t.cfr)}, ${cite(t, 'cfrBorderline')} uses ${cutRatio(t.cfrBorderline)}) — not enough on its own for microvascular dysfunction.`,
    rrrAbnormal: ` is below the ${cutRatio(t.rrr)} cut-off (${cite(t, 'rrr')}) — reduced resistive reserve`,
    mrrAbnormal: ` is below the ${cutRatio(t.mrr)} cut-off — reduced microvascular resistance reserve`,
    mrrBorderline: ` is in the ${cutRatio(t.mrr)}–${cutRatio(t.mrrBorderline)} borderline band`,
    mrrMethod,
    stenosisObstructive: ` with no pressure index is at or above ${cutPlain(t.obstructiveStenosisPct)}% (${cite(t, 'obstructiveStenosisPct')}) — obstructive by angiography.`,
    stenosisCut: cutPlain(t.obstructiveStenosisPct),
  };
}

let defaultCtx: Ctx | undefined;
let lastPartial: Partial<Thresholds> | undefined;
let lastCtx: Ctx | undefined;

function sameSettings(a: Partial<Thresholds>, b: Partial<Thresholds>): boolean {
  let na = 0;
  for (const k in a) {
    if (a[k as ThresholdKey] !== b[k as ThresholdKey]) return false;
    na++;
  }
  let nb = 0;
  for (const _ in b) nb++;
  return na === nb;
}

/** The context for the lab's (validated) partial settings; cached for the defaults and the last settings. */
export function contextFor(partial: Partial<Thresholds> | undefined): Ctx {
  let empty = true;
  if (partial !== undefined) {
    for (const k in partial) {
      if (partial[k as ThresholdKey] !== undefined && partial[k as ThresholdKey] !== defaultThresholds[k as ThresholdKey]) {
        empty = false;
        break;
      }
    }
  }
  if (empty) return (defaultCtx ??= build(defaultThresholds as Thresholds));
  const p = partial as Partial<Thresholds>;
  if (lastPartial !== undefined && lastCtx !== undefined && sameSettings(lastPartial, p)) return lastCtx;
  const ctx = build(resolveThresholds(p));
  lastPartial = { ...p };
  lastCtx = ctx;
  return ctx;
}
