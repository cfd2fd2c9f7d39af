/**
 * For an addendum: keep the thresholds of the version it amends (`original`, the default), or apply
 * those in force at its signature (`current`). A first signature always uses those in force.
 */
export const thresholdsChoices = ['original', 'current'] as const;
export type ThresholdsChoice = (typeof thresholdsChoices)[number];

/** Where a signed report's thresholds come from: the set in force at signing, or an addendum's choice. */
export const thresholdsBases = ['in-force', ...thresholdsChoices] as const;
export type ThresholdsBasis = (typeof thresholdsBases)[number];

/** Where a report's thresholds come from. */
export interface ThresholdsBasisInfo {
  /** `in-force`: the set in force at signing; for an addendum `original` (the amended version's) or `current`. */
  basis: ThresholdsBasis;
  /** When the set began to apply; null for the published defaults (or unknown for older versions). */
  effectiveFrom: string | null;
  /** The set's id; null for the published defaults. */
  setId: number | null;
  /** The version an addendum amends. */
  amendedVersion: number | null;
}
