import type { DataSource, EntityManager } from 'typeorm';
import { defaultThresholds, resolveThresholds, thresholdsSchema, type Thresholds } from '../../../shared/physiology';
import { thresholdLabels, thresholdSources } from '../../../shared/physiology/thresholds';
import {
  thresholdKeys,
  thresholdRanges,
  thresholdSourceOf,
  type ThresholdOverview,
  type ThresholdSetSummary,
  type ThresholdsInForce,
} from '../../../shared/settings/threshold-ranges';
import { ThresholdSet } from '../../db/entities/measurement.entities';

export type { ThresholdsInForce };

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
  return thresholdsInForceOf(set);
}

/** The thresholds a stored set (the newest in force, read by the caller) gives; the defaults without one. */
export function thresholdsInForceOf(set: Pick<ThresholdSet, 'id' | 'effectiveFrom' | 'values'> | null): ThresholdsInForce {
  if (!set) return { overrides: {}, values: { ...defaultThresholds }, setId: null, effectiveFrom: null };
  // A stored set was validated when saved; parse again so a hand-edited row cannot reach the analysis.
  const parsed = thresholdsSchema.safeParse(set.values);
  const overrides = parsed.success ? (parsed.data as Partial<Thresholds>) : {};
  return { overrides, values: resolveThresholds(overrides), setId: set.id, effectiveFrom: set.effectiveFrom.toISOString() };
}


const managerOf = (db: DataSource | EntityManager): EntityManager => ('manager' in db ? db.manager : db);

export function summaryOf(row: Pick<ThresholdSet, 'id' | 'effectiveFrom' | 'values' | 'note' | 'createdAt'>, createdBy: string | null): ThresholdSetSummary {
  const parsed = thresholdsSchema.safeParse(row.values);
  return {
    id: row.id,
    effectiveFrom: row.effectiveFrom.toISOString(),
    overrides: parsed.success ? (parsed.data as Partial<Thresholds>) : {},
    note: row.note,
    createdBy,
    createdAt: row.createdAt.toISOString(),
  };
}

/** Every cut-off with the value in force now, its source and allowed range; the sets scheduled and past. */
export async function thresholdOverview(db: DataSource | EntityManager, now = new Date()): Promise<ThresholdOverview> {
  const inForce = await thresholdsInForce(db, now);
  const rows = await managerOf(db)
    .createQueryBuilder(ThresholdSet, 't')
    .select(['t.id', 't.effectiveFrom', 't.values', 't.note', 't.createdAt'])
    .leftJoin('t.creator', 'u')
    .addSelect(['u.id', 'u.displayName'])
    .orderBy('t.effective_from', 'DESC')
    .addOrderBy('t.id', 'DESC')
    .limit(200)
    .getMany();
  const history = rows.map((row) => summaryOf(row, row.creator?.displayName ?? null));
  return {
    rows: thresholdKeys.map((key) => {
      const [label, unit] = thresholdLabels[key];
      const value = inForce.values[key];
      return { key, label, unit, value, defaultValue: defaultThresholds[key], source: thresholdSourceOf(key, value).source, defaultSource: thresholdSources[key], range: thresholdRanges[key] };
    }),
    inForce: { setId: inForce.setId, effectiveFrom: inForce.effectiveFrom },
    scheduled: history.filter((s: ThresholdSetSummary) => new Date(s.effectiveFrom) > now).reverse(),
    history,
  };
}
