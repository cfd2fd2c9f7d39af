/**
 * Cut-off comparisons with a tiny relative tolerance, so that a value mathematically equal to the
 * cut-off (e.g. a mean of three 0.3 s injections) is classified as "at the cut-off" despite
 * floating-point noise. The tolerance (1e-9) is far below any clinically displayed digit.
 */
const EPS = 1e-9;

export function atOrBelow(v: number, cut: number): boolean {
  return v <= cut + EPS * Math.abs(cut);
}

export function below(v: number, cut: number): boolean {
  return v < cut - EPS * Math.abs(cut);
}

export function atOrAbove(v: number, cut: number): boolean {
  return v >= cut - EPS * Math.abs(cut);
}

export function above(v: number, cut: number): boolean {
  return v > cut + EPS * Math.abs(cut);
}
