import { formatQuantity } from './precision';
import type { VesselCode } from './schema';
import { vesselShortName } from './vessels';

export function vesselName(code: VesselCode): string {
  return vesselShortName[code];
}

/** A ratio (FFR, Pd/Pa, CFR, RRR, MRR) in a sentence: at its display precision, the one it was judged at. */
export const ratio = (v: number): string => formatQuantity(v, 'ratio');

/** IMR in a sentence: a whole number of U, the precision it was judged at. */
export const imrText = (v: number): string => formatQuantity(v, 'imr');

/** A cut-off as written in a sentence: ratios with 2 decimals, whole numbers plainly. */
export function cutRatio(v: number): string {
  return v.toFixed(2);
}

export function cutPlain(v: number): string {
  return Number.isInteger(v) ? String(v) : String(Number(v.toFixed(2)));
}

export function joinAnd(xs: readonly string[]): string {
  if (xs.length <= 1) return xs.join('');
  return `${xs.slice(0, -1).join(', ')} and ${xs[xs.length - 1]}`;
}
