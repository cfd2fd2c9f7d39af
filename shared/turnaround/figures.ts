import type { Endotype } from '../physiology/types';

/**
 * The chief's turnaround and quality figures: what the server computes for a date range and the
 * screen draws. Pure data, no framework (the range's schema is in ./query).
 */

/** The intervals, each from one step to the next (hours). A step not yet taken leaves it open. */
export const intervalKeys = ['toSignature', 'toCoded', 'toDelivered', 'toDone'] as const;
export type IntervalKey = (typeof intervalKeys)[number];

export const intervalLabel: Readonly<Record<IntervalKey, string>> = Object.freeze({
  toSignature: 'Procedure end → signature',
  toCoded: 'Signature → codes reviewed',
  toDelivered: 'Signature → EHR delivered',
  toDone: 'Procedure end → all done',
});

/** Where a study's clock starts: procedure end, else its start, else when the record was opened. */
export const startBases = ['procedure-end', 'procedure-start', 'opened'] as const;
export type StartBasis = (typeof startBases)[number];
export const startBasisLabel: Readonly<Record<StartBasis, string>> = Object.freeze({
  'procedure-end': 'procedure end',
  'procedure-start': 'procedure start (no end recorded)',
  opened: 'record opened (no procedure time)',
});

/** Median and 90th percentile of the closed intervals; `open` counts studies whose step is not yet taken. */
export interface IntervalStats {
  closed: number;
  open: number;
  median: number | null;
  p90: number | null;
}
export type IntervalSet = Record<IntervalKey, IntervalStats>;

export interface WeekFigures {
  /** ISO week in the lab's time zone, e.g. 2025-W03. */
  week: string;
  /** Its Monday (YYYY-MM-DD). */
  weekStart: string;
  studies: number;
  intervals: IntervalSet;
}

export interface PhysicianFigures {
  physicianId: string | null;
  name: string;
  studies: number;
  /** Unsigned studies of the range past the signature target now. */
  overdue: number;
  intervals: IntervalSet;
}

export interface DriftBin {
  /** Lower bound (inclusive) and upper bound (exclusive) of Pd/Pa; null for an open tail. */
  from: number | null;
  to: number | null;
  vessels: number;
  /** Inside the default drift window (0.98–1.02). */
  inWindow: boolean;
}

export interface EndotypeMonth {
  month: string; // YYYY-MM
  counts: Partial<Record<Endotype | 'unknown', number>>;
}

export interface QualityFigures {
  /** Studies of the range with a signed report: the quality figures read what was signed. */
  signedStudies: number;
  /** Signed studies with a pressure-wire measurement, and those with a drift check for every such vessel. */
  pressureStudies: number;
  driftDocumentedStudies: number;
  driftVessels: number;
  driftOutsideVessels: number;
  driftBins: DriftBin[];
  /** Signed studies with thermodilution, and those with the expected injections at rest and at hyperaemia in every vessel. */
  thermoStudies: number;
  thermoCompleteStudies: number;
  vessels: number;
  warnedVessels: number;
  endotypes: EndotypeMonth[];
}

export interface TurnaroundFigures {
  from: string;
  to: string;
  timeZone: string;
  targetHours: number;
  studies: number;
  startBasis: Record<StartBasis, number>;
  totals: IntervalSet;
  weeks: WeekFigures[];
  physicians: PhysicianFigures[];
  quality: QualityFigures;
}

/**
 * Drift bins of 0.01 from 0.95 to 1.05, with open tails; the window is common practice (0.98–1.02).
 * The database files each vessel's band with these same edges (study_turnaround_quality).
 */
export const driftBinEdges = [0.95, 0.96, 0.97, 0.98, 0.99, 1.0, 1.01, 1.02, 1.03, 1.04, 1.05] as const;

export function driftBins(counts: ReadonlyMap<number, number>): DriftBin[] {
  const bins: DriftBin[] = [];
  for (let i = 0; i <= driftBinEdges.length; i++) {
    const from = i === 0 ? null : driftBinEdges[i - 1];
    const to = i === driftBinEdges.length ? null : driftBinEdges[i];
    bins.push({ from, to, vessels: counts.get(i) ?? 0, inWindow: from !== null && to !== null && from >= 0.98 - 1e-9 && to <= 1.02 + 1e-9 });
  }
  return bins;
}

export function driftBinLabel(b: DriftBin): string {
  if (b.from === null) return `< ${b.to!.toFixed(2)}`;
  if (b.to === null) return `≥ ${b.from.toFixed(2)}`;
  return `${b.from.toFixed(2)}–${b.to.toFixed(2)}`;
}

/** A share as a whole percentage, or a dash when there is nothing to divide. */
export function share(part: number, whole: number): string {
  return whole > 0 ? `${Math.round((part / whole) * 100)}%` : '—';
}
