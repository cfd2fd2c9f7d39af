import { roundForDisplay, type QuantityKind } from './precision';
import type { CutOffRule } from './thresholds';

/**
 * Cut-off comparisons made on the value as displayed (see precision.ts), so a flag never contradicts
 * the number printed beside it: FFR 0.804 shows 0.80 and is judged 0.80. A tiny relative tolerance
 * (1e-9) absorbs binary noise in the cut-off itself.
 */
const EPS = 1e-9;
/** `raw` compares an entered value as entered (a constriction of 89.6% is not 90%). */
const shown = (v: number, kind: QuantityKind | 'raw') => (kind === 'raw' ? v : roundForDisplay(v, kind));

export function atOrBelow(v: number, cut: number, kind: QuantityKind | 'raw'): boolean {
  return shown(v, kind) <= cut + EPS * Math.abs(cut);
}

export function below(v: number, cut: number, kind: QuantityKind | 'raw'): boolean {
  return shown(v, kind) < cut - EPS * Math.abs(cut);
}

export function atOrAbove(v: number, cut: number, kind: QuantityKind | 'raw'): boolean {
  return shown(v, kind) >= cut - EPS * Math.abs(cut);
}

export function above(v: number, cut: number, kind: QuantityKind | 'raw'): boolean {
  return shown(v, kind) > cut + EPS * Math.abs(cut);
}

/** Whether a value lies on the side a cut-off rule names (`cutOffRule` in thresholds.ts). */
export function onRuleSide(rule: CutOffRule, v: number, cut: number, kind: QuantityKind | 'raw'): boolean {
  return rule === 'atOrBelow' ? atOrBelow(v, cut, kind) : rule === 'below' ? below(v, cut, kind) : atOrAbove(v, cut, kind);
}
