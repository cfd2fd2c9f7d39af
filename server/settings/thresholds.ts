import type { DataSource } from 'typeorm';
import { defaultThresholds, type Thresholds } from '../../shared/physiology';
import { thresholdKeys, thresholdRelationProblems, type ThresholdOverview, type ThresholdSetRequest, type ThresholdSetSummary } from '../../shared/settings/threshold-ranges';
import { recordAudit, type AuditActor } from '../audit/audit';
import { ThresholdSet } from '../db/entities/measurement.entities';
import { InvalidRequestError } from '../errors';
import { localMidnight } from '../db/local-midnight';
import { labSettings } from './queries/lab-settings';
import { summaryOf, thresholdOverview, thresholdsInForce } from './queries/thresholds';

/** The thresholds a stored set gives (signing reads the set in force with its own statement). */
export { thresholdsInForceOf, type ThresholdsInForce } from './queries/thresholds';

/** The furthest ahead a set may be scheduled. */
const MAX_DAYS_AHEAD = 366;
/** Clock and typing allowance for a time given as "now". */
const GRACE_MS = 60_000;

/**
 * Adds a set of thresholds, in force from its effective date for studies signed from then on.
 * Values left out keep those in force at that date. The date is today or later: a date in the past
 * is refused, because reports signed since then were judged by the set in force when they were
 * signed and stay so. One audit row carries every value before and after.
 */
export async function createThresholdSet(dataSource: DataSource, request: ThresholdSetRequest, actor: AuditActor): Promise<{ set: ThresholdSetSummary; overview: ThresholdOverview }> {
  return dataSource.transaction(async (manager) => {
    // One change at a time, so "the set in force at that date" cannot move under a concurrent change (advisory lock: SQL).
    await manager.query(`SELECT pg_advisory_xact_lock(hashtext('threshold_set'))`);
    const { timeZone } = await labSettings(manager);
    // The database's clock and its time-zone rules (SQL), so the day is the lab's, not the server process's.
    const [{ now, today }] = await manager.query(`SELECT now() AS now, (now() AT TIME ZONE $1)::date::text AS today`, [timeZone]);
    let effective: Date;
    if (!request.effectiveFrom) effective = now;
    else if (/^\d{4}-\d{2}-\d{2}$/.test(request.effectiveFrom)) {
      if (request.effectiveFrom < today) throw new InvalidRequestError('The thresholds cannot take effect in the past.', [{ pointer: '/effectiveFrom', detail: `effectiveFrom must be today (${today}, ${timeZone}) or later: reports signed before now keep the thresholds they were judged by.` }]);
      if (request.effectiveFrom === today) effective = now;
      // The first instant of that day in the lab's time zone, by the database's time-zone rules (SQL).
      else [{ effective }] = await manager.query(`SELECT ${localMidnight('$1::date', '$2')} AS effective`, [request.effectiveFrom, timeZone]);
    } else {
      effective = new Date(request.effectiveFrom);
      if (effective.getTime() < now.getTime() - GRACE_MS) throw new InvalidRequestError('The thresholds cannot take effect in the past.', [{ pointer: '/effectiveFrom', detail: 'effectiveFrom must be now or later: reports signed before now keep the thresholds they were judged by.' }]);
      if (effective < now) effective = now;
    }
    if (effective.getTime() > now.getTime() + MAX_DAYS_AHEAD * 86_400_000) {
      throw new InvalidRequestError('The effective date is too far ahead.', [{ pointer: '/effectiveFrom', detail: `effectiveFrom must be within ${MAX_DAYS_AHEAD} days from today.` }]);
    }

    const before = (await thresholdsInForce(manager, effective)).values;
    const after: Thresholds = { ...before };
    for (const key of thresholdKeys) {
      const v = request.values[key];
      if (v !== undefined) after[key] = v;
    }
    const relations = thresholdRelationProblems(after);
    if (relations.length) {
      throw new InvalidRequestError(`The thresholds have ${relations.length === 1 ? 'a field' : `${relations.length} fields`} to correct.`, relations.map((p) => ({ pointer: `/values/${p.key}`, detail: p.message })));
    }
    const changed: Record<string, { before: number; after: number }> = {};
    for (const key of thresholdKeys) if (before[key] !== after[key]) changed[key] = { before: before[key], after: after[key] };
    if (Object.keys(changed).length === 0) {
      throw new InvalidRequestError('Nothing to change: every value is already in force at that date.', [{ pointer: '/values', detail: 'Change at least one threshold.' }]);
    }
    const overrides: Partial<Thresholds> = {};
    for (const key of thresholdKeys) if (after[key] !== defaultThresholds[key]) overrides[key] = after[key];

    // Only the columns the server's role may write; the id and created_at come back from the database (RETURNING).
    const values = { effectiveFrom: effective, values: overrides, note: request.note ?? null, createdBy: actor.actorUserId ?? null };
    const { generatedMaps } = await manager.insert(ThresholdSet, values);
    const row = { ...values, ...(generatedMaps[0] as Pick<ThresholdSet, 'id' | 'createdAt'>) };
    await recordAudit(manager, {
      ...actor,
      action: 'create',
      entityType: 'settings',
      entityId: 'thresholds',
      outcome: 'success',
      detail: { setting: 'thresholds', thresholdSetId: row.id, effectiveFrom: row.effectiveFrom.toISOString(), changed, before, after, note: request.note ?? null },
    });
    return { set: summaryOf(row, actor.actorName ?? null), overview: await thresholdOverview(manager, now) };
  });
}
