import type { DataSource, EntityManager } from 'typeorm';
import { defaultThresholds, resolveThresholds, thresholdsSchema, type Thresholds } from '../../shared/physiology';
import { ThresholdSet } from '../db/entities/measurement.entities';

export interface ThresholdsInForce {
  /** The lab's values where they differ from the published defaults. */
  overrides: Partial<Thresholds>;
  /** Every threshold the analysis uses: defaults with the overrides applied. */
  values: Thresholds;
  /** The set in force, or null when the published defaults are used. */
  setId: number | null;
  effectiveFrom: string | null;
}

/**
 * The lab's thresholds in force at a moment (now by default): the newest set whose effective date
 * has come. The same values feed the server's analysis, the live form and the drift banners.
 */
export async function thresholdsInForce(db: DataSource | EntityManager, at: Date = new Date()): Promise<ThresholdsInForce> {
  const manager = 'manager' in db ? db.manager : db;
  const set = await manager
    .createQueryBuilder(ThresholdSet, 't')
    .where('t.effective_from <= :at', { at })
    .orderBy('t.effective_from', 'DESC')
    .addOrderBy('t.id', 'DESC')
    .getOne();
  if (!set) return { overrides: {}, values: { ...defaultThresholds }, setId: null, effectiveFrom: null };
  // A stored set was validated when saved; parse again so a hand-edited row cannot reach the analysis.
  const parsed = thresholdsSchema.safeParse(set.values);
  const overrides = parsed.success ? (parsed.data as Partial<Thresholds>) : {};
  return { overrides, values: resolveThresholds(overrides), setId: set.id, effectiveFrom: set.effectiveFrom.toISOString() };
}
