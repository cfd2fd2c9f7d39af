/**
 * The one display-precision rule. Every index is judged at the precision it is shown and reported
 * (ratios to 2 decimals, IMR as a whole number, pressures as whole mmHg), so a flag never contradicts
 * the number printed beside it. The core judges with `roundForDisplay`; the screens, the report and
 * the FHIR bundle print with `formatQuantity`. Values are kept unrounded everywhere else.
 */

/** What kind of quantity a number is, which decides its displayed decimals. */
export type QuantityKind =
  | 'ratio' // FFR, Pd/Pa, resting ratios, drift Pd/Pa, CFR, RRR, MRR
  | 'imr' // IMR, corrected or not (U = mmHg·s)
  | 'pressure' // mmHg
  | 'transit' // Tmn, seconds
  | 'percent'
  | 'dose'; // µg

export const displayDecimals: Readonly<Record<QuantityKind, number>> = Object.freeze({
  ratio: 2,
  imr: 0,
  pressure: 0,
  transit: 2,
  percent: 0,
  dose: 0,
});

/** Units as printed beside a value ('' for a ratio). */
export const displayUnit: Readonly<Record<QuantityKind, string>> = Object.freeze({
  ratio: '',
  imr: 'U',
  pressure: 'mmHg',
  transit: 's',
  percent: '%',
  dose: 'µg',
});

/**
 * Rounds half away from zero at `decimals`, after clearing binary noise (0.1 + 0.2, 0.9 / 0.3), so
 * that 0.805 rounds to 0.81 and 1.005 to 1.01 as a person reading the decimal would expect.
 */
export function roundHalfAway(value: number, decimals: number): number {
  if (!Number.isFinite(value)) return value;
  const clean = Number(value.toPrecision(12));
  const scaled = Math.round(Math.abs(clean) * 10 ** decimals + 1e-9);
  const out = (Math.sign(clean) * scaled) / 10 ** decimals;
  return Object.is(out, -0) ? 0 : out;
}

/** The value as it is displayed and judged. */
export function roundForDisplay(value: number, kind: QuantityKind): number {
  return roundHalfAway(value, displayDecimals[kind]);
}

/** The value as text at its display precision (no unit). */
export function formatQuantity(value: number, kind: QuantityKind): string {
  return roundForDisplay(value, kind).toFixed(displayDecimals[kind]);
}

/** The value with its unit, e.g. "21 U", "0.80", "96 mmHg". */
export function formatWithUnit(value: number, kind: QuantityKind): string {
  const unit = displayUnit[kind];
  return unit ? `${formatQuantity(value, kind)} ${unit}` : formatQuantity(value, kind);
}

/**
 * A value judged as entered (a visual stenosis, a constriction, the drift check), as text that agrees
 * with its verdict: at its display precision when that reads on the same side of the cut-off, else
 * with as many more decimals as it takes (89.6% judged below 90% prints "89.6", never "90").
 * `verdict` returns the category a number falls in; the printed number falls in the value's own.
 */
export function formatAgreeing(value: number, kind: QuantityKind, verdict: (x: number) => unknown): string {
  const own = verdict(value);
  for (let d = displayDecimals[kind]; d <= 9; d++) {
    const shown = roundHalfAway(value, d);
    if (verdict(shown) === own) return shown.toFixed(d);
  }
  return String(value);
}
