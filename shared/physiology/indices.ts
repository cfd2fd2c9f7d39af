import { above, atOrAbove, onRuleSide } from './compare';
import { imrText, ratio } from './format';
import { roundForDisplay } from './precision';
import type { ProcedureInput, VesselInput } from './schema';
import { cutOffKind, cutOffRule, type CutOffKey, type Thresholds } from './thresholds';
import type { Flag, PhysiologyWarning, VesselResult } from './types';
import {
  checkCfrBelowOne,
  checkDrift,
  checkHyperemia,
  checkImplausible,
  checkInjections,
  checkMissingSide,
  checkPdAbovePa,
} from './quality';

/** Entered FFR and pressure-derived FFR may differ by this much before a warning. [practice] */
export const FFR_MISMATCH_TOLERANCE = 0.02;

/** Yong correction: IMR = Pa × Tmn × (1.35 × Pd/Pa − 0.32). */
const YONG_SLOPE = 1.35;
const YONG_INTERCEPT = 0.32;

const nhprKindName = {
  'whole-cycle': 'whole-cycle resting ratio',
  diastolic: 'diastolic resting ratio',
  'full-cycle-minimum': 'full-cycle minimum resting ratio',
} as const;

export function nhprName(kind: keyof typeof nhprKindName): string {
  return nhprKindName[kind];
}

export function nhprCutoffKey(kind: keyof typeof nhprKindName) {
  return kind === 'diastolic'
    ? ('nhprDiastolic' as const)
    : kind === 'full-cycle-minimum'
      ? ('nhprFullCycleMinimum' as const)
      : ('nhprWholeCycle' as const);
}

function mean(xs: readonly number[]): number {
  let s = 0;
  for (let i = 0; i < xs.length; i++) s += xs[i];
  return s / xs.length;
}

/** Whether a value is on the abnormal side of a cut-off by the key's rule, judged at the displayed precision. */
const beyond = (key: CutOffKey, v: number, cut: number): boolean => onRuleSide(cutOffRule[key], v, cut, cutOffKind(key));
const flagBy = (key: CutOffKey, v: number, cut: number): Flag => (beyond(key, v, cut) ? 'abnormal' : 'normal');

/** Compute every index, flag and quality warning for one vessel. `label` names the vessel in messages. */
export function analyzeVessel(v: VesselInput, t: Thresholds, label: string, procedure?: ProcedureInput): VesselResult {
  const warnings: PhysiologyWarning[] = [];
  const out: VesselResult = { id: v.id, vessel: v.vessel, warnings };
  const rest = v.rest;
  const hyp = v.hyperemia;
  const restPa = rest?.pa;
  const restPd = rest?.pd;
  const hypPa = hyp?.pa;
  const hypPd = hyp?.pd;
  const max = t.pdPaMaxPlausible;
  /** A value above the plausible maximum gets a warning and no verdict (its flag is left out). */
  const plausible = (value: number) => !above(value, max, 'ratio');

  // FFR: pressures win over the entered value.
  let ffr: number | undefined;
  if (hypPa !== undefined && hypPd !== undefined) {
    ffr = hypPd / hypPa;
    out.ffrSource = 'pressures';
    // Typed whole-mmHg means are coarser than the console's tracing: a difference beyond the tolerance,
    // or one that puts the two values on opposite sides of the cut-off, is said and qualifies the verdict.
    if (v.ffr !== undefined) {
      // Judged on the two values as printed (two decimals), so the message never says "by more than
      // 0.02" of two numbers printed 0.02 apart.
      const apart = Math.abs(roundForDisplay(v.ffr, 'ratio') - roundForDisplay(ffr, 'ratio')) > FFR_MISMATCH_TOLERANCE + 1e-9;
      const acrossCut = beyond('ffr', v.ffr, t.ffr) !== beyond('ffr', ffr, t.ffr);
      if (apart || acrossCut) {
        warnings.push({
          code: 'ffr-mismatch',
          message: acrossCut
            ? `${label}: the console FFR ${ratio(v.ffr)} and hyperaemic Pd/Pa ${ratio(ffr)} from the typed pressures fall on opposite sides of the ${ratio(t.ffr)} cut-off; the value from the pressures is shown — check the tracing before deciding.`
            : `${label}: the entered FFR ${ratio(v.ffr)} differs from hyperaemic Pd/Pa ${ratio(ffr)} by more than ${FFR_MISMATCH_TOLERANCE.toFixed(2)}; the value from the pressures is used.`,
        });
      }
    }
  } else if (v.ffr !== undefined) {
    ffr = v.ffr;
    out.ffrSource = 'entered';
  }
  if (ffr !== undefined) {
    out.ffr = ffr;
    if (plausible(ffr)) {
      const flag = flagBy('ffr', ffr, t.ffr);
      out.ffrFlag = flag;
      if (flag === 'abnormal' && atOrAbove(ffr, t.ffrGreyZoneLow, 'ratio')) out.ffrGreyZone = true;
    }
  }

  let restingPdPa: number | undefined;
  if (restPa !== undefined && restPd !== undefined) {
    restingPdPa = restPd / restPa;
    out.restingPdPa = restingPdPa;
    if (plausible(restingPdPa)) out.restingPdPaFlag = flagBy('restingPdPa', restingPdPa, t.restingPdPa);
  }

  const nhpr = v.nhpr;
  if (nhpr !== undefined) {
    out.nhpr = nhpr.value;
    out.nhprKind = nhpr.kind;
    if (plausible(nhpr.value)) out.nhprFlag = flagBy(nhprCutoffKey(nhpr.kind), nhpr.value, t[nhprCutoffKey(nhpr.kind)]);
  }

  if (v.visualStenosisPct !== undefined) out.visualStenosisPct = v.visualStenosisPct;

  // Thermodilution: transit times count whether or not pressures were entered in the same state.
  const tmnR = rest?.tmn !== undefined && rest.tmn.length > 0 ? rest.tmn : undefined;
  const tmnH = hyp?.tmn !== undefined && hyp.tmn.length > 0 ? hyp.tmn : undefined;
  // An empty list says thermodilution was meant but no injection was recorded: fewer than expected.
  if (rest?.tmn !== undefined && rest.tmn.length === 0) checkInjections(rest.tmn, 'rest', t, label, warnings);
  if (hyp?.tmn !== undefined && hyp.tmn.length === 0) checkInjections(hyp.tmn, 'hyperaemia', t, label, warnings);
  let tr: number | undefined;
  let th: number | undefined;
  if (tmnR !== undefined) {
    tr = mean(tmnR);
    out.tmnRest = tr;
    checkInjections(tmnR, 'rest', t, label, warnings);
  }
  if (tmnH !== undefined) {
    th = mean(tmnH);
    out.tmnHyperemia = th;
    checkInjections(tmnH, 'hyperaemia', t, label, warnings);
  }

  let cfr: number | undefined;
  // A CFR below 1 (hyperaemic transit longer than resting) is taken for a measurement error, most often
  // swapped sets: the thermodilution indices are shown but given no verdict, so they decide nothing.
  let thermodilutionDoubtful = false;
  if (tr !== undefined && th !== undefined) {
    cfr = tr / th;
    out.cfr = cfr;
    thermodilutionDoubtful = checkCfrBelowOne(cfr, label, warnings);
    if (!thermodilutionDoubtful) {
      out.cfrFlag = beyond('cfr', cfr, t.cfr)
        ? 'abnormal'
        : beyond('cfrBorderline', cfr, Math.max(t.cfr, t.cfrBorderline))
          ? 'borderline'
          : 'normal';
    }
  }

  // IMR needs hyperaemic pressures and transit times.
  if (hypPa !== undefined && hypPd !== undefined && th !== undefined) {
    const pa = hypPa;
    const pd = hypPd;
    const uncorrected = pd * th;
    out.imrUncorrected = uncorrected;
    let imr: number | undefined;
    const pw = v.wedgePressure;
    if (pw !== undefined) {
      if (pw < pd && pw < pa) {
        imr = (pa * th * (pd - pw)) / (pa - pw);
        out.imrMethod = 'wedge';
      } else {
        warnings.push({
          code: 'wedge-invalid',
          message: `${label}: wedge pressure ${pw} mmHg is not below hyperaemic Pd ${pd} mmHg and Pa ${pa} mmHg, so it was not used to correct IMR.`,
        });
      }
    }
    let correctionImpossible = false;
    if (imr === undefined && out.ffrFlag === 'abnormal') {
      const factor = (YONG_SLOPE * pd) / pa - YONG_INTERCEPT;
      if (factor > 0) {
        imr = pa * th * factor;
        out.imrMethod = 'yong';
      } else {
        // Below Pd/Pa ≈ 0.24 the correction gives no positive value: report no IMR rather than a wrong one.
        correctionImpossible = true;
        warnings.push({
          code: 'imr-correction-invalid',
          message: `${label}: hyperaemic Pd/Pa ${ratio(pd / pa)} is too low for the IMR correction without wedge pressure, so no IMR is reported (Pd × Tmn ${imrText(uncorrected)} U overestimates it); measure the wedge pressure to correct it.`,
        });
      }
    }
    if (imr === undefined && !correctionImpossible) {
      imr = uncorrected;
      out.imrMethod = 'pd-tmn';
    }
    if (imr !== undefined) {
      out.imr = imr;
      if (!thermodilutionDoubtful) out.imrFlag = flagBy('imr', imr, t.imr);
    }
  }

  if (cfr !== undefined && restPd !== undefined && hypPd !== undefined) {
    const rrr = (cfr * restPd) / hypPd;
    out.rrr = rrr;
    if (!thermodilutionDoubtful) out.rrrFlag = flagBy('rrr', rrr, t.rrr);
  }
  if (cfr !== undefined && ffr !== undefined && restPa !== undefined && hypPa !== undefined) {
    const mrr = (cfr / ffr) * (restPa / hypPa);
    out.mrr = mrr;
    out.mrrMethod = 'bolus-thermodilution';
    if (!thermodilutionDoubtful) {
      out.mrrFlag = beyond('mrr', mrr, t.mrr)
        ? 'abnormal'
        : beyond('mrrBorderline', mrr, Math.max(t.mrr, t.mrrBorderline)) && t.mrrBorderline > t.mrr
          ? 'borderline'
          : 'normal';
    }
  }

  // Quality checks.
  checkMissingSide(tmnR !== undefined, tmnH !== undefined, label, warnings);
  if (v.driftPdPa !== undefined) checkDrift(v.driftPdPa, t, label, warnings);
  if (restPa !== undefined && restPd !== undefined) checkPdAbovePa(restPd, restPa, 'rest', t, label, warnings);
  if (hypPa !== undefined && hypPd !== undefined) checkPdAbovePa(hypPd, hypPa, 'hyperaemia', t, label, warnings);
  if (restingPdPa !== undefined && hypPa !== undefined && hypPd !== undefined) {
    const hypRatio = hypPd / hypPa;
    // Judged on the two ratios as printed, like every ratio.
    if (roundForDisplay(hypRatio, 'ratio') - roundForDisplay(restingPdPa, 'ratio') > t.hyperemicAboveRestingTolerance + 1e-9) {
      warnings.push({
        code: 'hyperemic-above-resting',
        message: `${label}: hyperaemic Pd/Pa ${ratio(hypRatio)} is higher than resting Pd/Pa ${ratio(restingPdPa)} by more than ${t.hyperemicAboveRestingTolerance.toFixed(2)}, which is physiologically unexpected; check hyperaemia and equalization.`,
      });
    }
  }
  if (restPa !== undefined && hypPa !== undefined) checkHyperemia(restPa, hypPa, procedure, label, warnings);
  if (restingPdPa !== undefined) checkImplausible(restingPdPa, 'resting Pd/Pa', max, label, warnings);
  if (hypPa !== undefined && hypPd !== undefined) checkImplausible(hypPd / hypPa, 'hyperaemic Pd/Pa (FFR)', max, label, warnings);
  if (v.ffr !== undefined) checkImplausible(v.ffr, 'entered FFR', max, label, warnings);
  if (nhpr !== undefined) checkImplausible(nhpr.value, `entered ${nhprName(nhpr.kind)}`, max, label, warnings);

  return out;
}
