import { above, below } from './compare';
import { formatAgreeing, roundForDisplay } from './precision';
import { cutPlain, cutRatio, ratio } from './format';
import { cite, type Thresholds } from './thresholds';
import type { ProcedureInput } from './schema';
import type { PhysiologyWarning } from './types';

type Phase = 'rest' | 'hyperaemia';

/** Injection count and spread within one thermodilution set. */
export function checkInjections(
  tmn: readonly number[],
  phase: Phase,
  t: Thresholds,
  label: string,
  warnings: PhysiologyWarning[],
): void {
  const n = tmn.length;
  if (n < t.minInjections) {
    warnings.push({
      code: 'few-injections',
      message: `${label}: only ${n} ${phase === 'rest' ? 'resting' : 'hyperaemic'} injection${n === 1 ? '' : 's'} (at least ${t.minInjections} expected, ${cite(t, 'minInjections')}); the mean transit time is less reliable.`,
    });
  }
  if (n < 2) return;
  let sum = 0;
  for (let i = 0; i < n; i++) sum += tmn[i];
  const spread = t.injectionSpread;
  // The spread is printed as a whole percentage and judged as printed, so "30%" is never "more than 30%".
  const limitPct = spread * 100;
  for (let i = 0; i < n; i++) {
    const x = tmn[i];
    const others = (sum - x) / (n - 1);
    const pct = roundForDisplay((Math.abs(x - others) / others) * 100, 'percent');
    if (above(pct, limitPct, 'raw')) {
      warnings.push({
        code: 'injection-spread',
        message: `${label}: ${phase} injection ${i + 1} (Tmn ${x.toFixed(2)} s) differs by ${pct}% from the mean of the other ${phase} injections (${others.toFixed(2)} s), more than ${cutPlain(limitPct)}% (${cite(t, 'injectionSpread')}); consider repeating it.`,
      });
    }
  }
}

export function checkMissingSide(
  hasRestTmn: boolean,
  hasHypTmn: boolean,
  label: string,
  warnings: PhysiologyWarning[],
): void {
  if (hasHypTmn && !hasRestTmn) {
    warnings.push({
      code: 'missing-rest',
      message: `${label}: hyperaemic transit times were entered without resting ones, so CFR, RRR and MRR could not be computed.`,
    });
  } else if (hasRestTmn && !hasHypTmn) {
    warnings.push({
      code: 'missing-hyperemia',
      message: `${label}: resting transit times were entered without hyperaemic ones, so CFR, IMR, RRR and MRR could not be computed.`,
    });
  }
}

/** The drift Pd/Pa is judged at its displayed precision, like every ratio. */
/**
 * The one drift rule: Pd/Pa at the guide tip outside the window. Drift is a quality check, not a
 * reported index, so it is judged on the value as entered: 0.975 is 2.5 mmHg of drift at Pa 100.
 */
export function driftOutOfRange(drift: number, t: Pick<Thresholds, 'driftLow' | 'driftHigh'>): boolean {
  return below(drift, t.driftLow, 'raw') || above(drift, t.driftHigh, 'raw');
}

/** The drift Pd/Pa as text that agrees with its verdict: 0.975 is outside 0.98–1.02 and prints "0.975", not "0.98". */
export function driftText(drift: number, t: Pick<Thresholds, 'driftLow' | 'driftHigh'>): string {
  return formatAgreeing(drift, 'ratio', (x) => driftOutOfRange(x, t));
}

export function checkDrift(drift: number, t: Thresholds, label: string, warnings: PhysiologyWarning[]): void {
  if (driftOutOfRange(drift, t)) {
    warnings.push({
      code: 'drift-out-of-range',
      message: `${label}: Pd/Pa at the guide tip after pull-back was ${driftText(drift, t)}, outside ${cutRatio(t.driftLow)}–${cutRatio(t.driftHigh)} (${cite(t, 'driftLow')}); sensor drift may have shifted the values — repeat the measurement.`,
    });
  }
}

/** Pd above Pa only beyond a tolerance (about the size of acceptable drift), so the warning stays meaningful. */
export function checkPdAbovePa(
  pd: number,
  pa: number,
  phase: Phase,
  t: Thresholds,
  label: string,
  warnings: PhysiologyWarning[],
): void {
  if (pd - pa > t.pdAbovePaToleranceMmHg + 1e-9) {
    warnings.push({
      code: 'pd-above-pa',
      message: `${label}: ${phase === 'rest' ? 'resting' : 'hyperaemic'} Pd ${pd} mmHg is above Pa ${pa} mmHg by more than ${t.pdAbovePaToleranceMmHg} mmHg; check equalization, drift and the transducer height.`,
    });
  }
}

export function checkImplausible(
  value: number,
  what: string,
  max: number,
  label: string,
  warnings: PhysiologyWarning[],
): void {
  if (above(value, max, 'ratio')) {
    warnings.push({
      code: 'pd-pa-implausible',
      message: `${label}: ${what} ${ratio(value)} is above ${cutRatio(max)}, which is implausible, so it is given no verdict — check equalization and drift.`,
    });
  }
}

/**
 * A hyperaemic transit time longer than the resting one (CFR below 1, as displayed): most often the two
 * sets were swapped. Returns true when it warned; the caller then leaves the thermodilution indices unjudged.
 */
export function checkCfrBelowOne(cfr: number, label: string, warnings: PhysiologyWarning[]): boolean {
  if (!below(cfr, 1, 'ratio')) return false;
  warnings.push({
    code: 'cfr-below-one',
    message: `${label}: CFR ${ratio(cfr)} is below 1 — the hyperaemic transit times are longer than the resting ones, most likely a measurement error (check that the two sets were not swapped). CFR and the indices computed from the transit times (IMR, RRR, MRR) are shown but not judged, and no microvascular finding is drawn from them.`,
  });
  return true;
}

/**
 * Intravenous adenosine lowers the aortic pressure a little; no fall at all suggests the infusion did
 * not reach hyperaemia (common practice).
 */
export function checkHyperemia(
  restPa: number,
  hypPa: number,
  procedure: ProcedureInput | undefined,
  label: string,
  warnings: PhysiologyWarning[],
): void {
  if (procedure?.hyperemicAgent !== 'adenosine' || procedure.hyperemicRoute !== 'intravenous') return;
  if (hypPa >= restPa) {
    warnings.push({
      code: 'hyperemia-inadequate',
      message: `${label}: aortic pressure did not fall on intravenous adenosine (Pa ${restPa} mmHg at rest, ${hypPa} mmHg at hyperaemia); hyperaemia may have been inadequate, which would overestimate FFR, underestimate CFR and overestimate IMR (a longer hyperaemic transit time raises IMR).`,
    });
  }
}
