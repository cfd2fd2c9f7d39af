import { above, below } from './compare';
import { cutRatio, ratio } from './format';
import { cite, type Thresholds } from './thresholds';
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
  for (let i = 0; i < n; i++) {
    const x = tmn[i];
    const others = (sum - x) / (n - 1);
    if (above(Math.abs(x - others), spread * others)) {
      const pct = Math.round((Math.abs(x - others) / others) * 100);
      warnings.push({
        code: 'injection-spread',
        message: `${label}: ${phase} injection ${i + 1} (Tmn ${x.toFixed(2)} s) differs by ${pct}% from the mean of the other ${phase} injections (${others.toFixed(2)} s), more than ${Math.round(spread * 100)}% (${cite(t, 'injectionSpread')}); consider repeating it.`,
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

export function checkDrift(drift: number, t: Thresholds, label: string, warnings: PhysiologyWarning[]): void {
  if (below(drift, t.driftLow) || above(drift, t.driftHigh)) {
    warnings.push({
      code: 'drift-out-of-range',
      message: `${label}: Pd/Pa at the guide tip after pull-back was ${ratio(drift)}, outside ${cutRatio(t.driftLow)}–${cutRatio(t.driftHigh)} (${cite(t, 'driftLow')}); sensor drift may have shifted the values — repeat the measurement.`,
    });
  }
}

export function checkPdAbovePa(
  pd: number,
  pa: number,
  phase: Phase,
  label: string,
  warnings: PhysiologyWarning[],
): void {
  if (pd > pa) {
    warnings.push({
      code: 'pd-above-pa',
      message: `${label}: ${phase === 'rest' ? 'resting' : 'hyperaemic'} Pd ${pd} mmHg is above Pa ${pa} mmHg; check equalization, drift and the transducer height.`,
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
  if (above(value, max)) {
    warnings.push({
      code: 'pd-pa-implausible',
      message: `${label}: ${what} ${ratio(value)} is above ${cutRatio(max)}, which is implausible; the value was accepted — check equalization and drift.`,
    });
  }
}
