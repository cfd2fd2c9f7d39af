// Timing helpers shared by the benchmarks: sequential timed calls after a warm-up, and the
// percentiles they print.

export interface TimingSummary {
  p50: number;
  p95: number;
  max: number;
}

/** The nearest-rank percentile (`p` in 0–1) of values sorted ascending. */
export function percentile(sorted: readonly number[], p: number): number {
  return sorted[Math.min(sorted.length - 1, Math.ceil(p * sorted.length) - 1)];
}

/** p50, p95 (nearest rank) and the maximum of a set of durations. */
export function summary(times: readonly number[]): TimingSummary {
  const s = [...times].sort((a, b) => a - b);
  return { p50: percentile(s, 0.5), p95: percentile(s, 0.95), max: s[s.length - 1] };
}

/** The median: the middle value, or the mean of the two middle ones for an even count. */
export function median(values: readonly number[]): number {
  const s = [...values].sort((a, b) => a - b);
  return s.length % 2 ? s[(s.length - 1) / 2] : (s[s.length / 2 - 1] + s[s.length / 2]) / 2;
}

/** Calls `fn` `warmUp` times untimed, then `timed` times one after another; the durations in ms. */
export async function timeRequests(fn: () => Promise<unknown>, { warmUp = 0, timed }: { warmUp?: number; timed: number }): Promise<number[]> {
  for (let i = 0; i < warmUp; i++) await fn();
  const times: number[] = [];
  for (let i = 0; i < timed; i++) {
    const t0 = performance.now();
    await fn();
    times.push(performance.now() - t0);
  }
  return times;
}
