import type { VesselCode } from './schema';

const vesselNames: Record<VesselCode, string> = {
  LM: 'LM',
  LAD: 'LAD',
  LCX: 'LCX',
  RCA: 'RCA',
  RAMUS: 'Ramus',
  DIAGONAL: 'Diagonal',
  OBTUSE_MARGINAL: 'Obtuse marginal',
  PDA: 'PDA',
  PLB: 'PLB',
  GRAFT: 'Graft',
};

export function vesselName(code: VesselCode): string {
  return vesselNames[code];
}

/**
 * A value for a reason sentence, with `dp` decimals; one more decimal when the rounded value would
 * read the same as the cut-off without being equal to it (e.g. CFR 1.996 against 2.00).
 */
export function fmt(v: number, dp: number, cut?: number): string {
  const s = v.toFixed(dp);
  if (cut === undefined) return s;
  const d = Math.abs(v - cut);
  // Only a value within half a display step of the cut-off can print as the cut-off.
  if (d > 1e-9 * Math.abs(cut) && d <= 0.51 * 10 ** -dp && s === cut.toFixed(dp)) return v.toFixed(dp + 1);
  return s;
}

export const ratio = (v: number, cut?: number): string => fmt(v, 2, cut);

/** A cut-off as written in a sentence: ratios with 2 decimals, whole numbers plainly. */
export function cutRatio(v: number): string {
  return v.toFixed(2);
}

export function cutPlain(v: number): string {
  return Number.isInteger(v) ? String(v) : String(Number(v.toFixed(2)));
}
