import type { DataSource } from 'typeorm';
import type { Endotype } from '../../shared/physiology/types';
import {
  driftBins,
  intervalKeys,
  startBases,
  type EndotypeMonth,
  type IntervalSet,
  type QualityFigures,
  type StartBasis,
  type TurnaroundFigures,
} from '../../shared/turnaround/figures';
import type { TurnaroundQuery } from '../../shared/turnaround/query';
import type { TurnaroundSettings } from './settings';

/**
 * The studies of a range of days in the lab's time zone (both ends included), by the time their
 * clock starts. $1 from, $2 to (dates), $3 the time zone.
 */
export const rangeCondition = `t.started_at >= ($1::date)::timestamp AT TIME ZONE $3::text
  AND t.started_at < ($2::date + 1)::timestamp AT TIME ZONE $3::text`;

/** The four intervals of one study in hours (float8); NULL while a step is missing (the interval is open). */
export const intervalColumns = `
  date_part('epoch', t.signed_at - t.started_at) / 3600 AS to_signature,
  date_part('epoch', t.coded_at - t.signed_at) / 3600 AS to_coded,
  date_part('epoch', t.delivered_at - t.signed_at) / 3600 AS to_delivered,
  CASE WHEN t.signed_at IS NOT NULL AND t.coded_at IS NOT NULL AND t.delivered_at IS NOT NULL
       THEN date_part('epoch', GREATEST(t.signed_at, t.coded_at, t.delivered_at) - t.started_at) / 3600 END AS to_done`;

const columnOf = { toSignature: 'to_signature', toCoded: 'to_coded', toDelivered: 'to_delivered', toDone: 'to_done' } as const;

// Median and 90th percentile by continuous interpolation (percentile_cont), of closed intervals only;
// both from one sort of each interval (the array form).
const statsSelect = intervalKeys
  .map((k) => {
    const c = columnOf[k];
    return `count(${c})::int AS ${c}_closed, (count(*) - count(${c}))::int AS ${c}_open,
      percentile_cont(ARRAY[0.5, 0.9]) WITHIN GROUP (ORDER BY ${c}) AS ${c}_pct`;
  })
  .join(',\n');

function intervalsOf(row: Record<string, unknown>): IntervalSet {
  const num = (v: unknown) => (v === null || v === undefined ? null : Number(v));
  return Object.fromEntries(
    intervalKeys.map((k) => {
      const c = columnOf[k];
      const pct = row[`${c}_pct`] as (number | null)[] | null;
      return [k, { closed: Number(row[`${c}_closed`]), open: Number(row[`${c}_open`]), median: num(pct?.[0]), p90: num(pct?.[1]) }];
    }),
  ) as IntervalSet;
}

/** Memory for the statement's sorts (per sort): 100,000 studies sort in memory instead of on disk. */
export const figuresWorkMem = '32MB';

/**
 * The one statement behind the figures: the range is read once (an index-only scan of the covering
 * index on `started_at`) into a materialised set, which the four aggregates then share.
 * $1 from, $2 to, $3 time zone, $4 now, $5 target hours.
 */
export function figuresQuery(query: TurnaroundQuery, settings: TurnaroundSettings, now = new Date()): { sql: string; params: unknown[] } {
  return {
    sql: `WITH r AS MATERIALIZED (
         SELECT t.physician_id, t.start_basis, t.signed_at, t.started_at, t.endotype, t.vessels, t.warned_vessels,
                t.pressure_vessels, t.drift_vessels, t.drift_outside_vessels, t.drift_bins, t.thermo_vessels, t.thermo_complete_vessels,
                (t.started_at AT TIME ZONE $3::text)::date AS local_day,
                date_trunc('week', t.started_at AT TIME ZONE $3::text)::date AS week_start,
                ${intervalColumns}
         FROM study_turnaround t
         WHERE ${rangeCondition}
       ),
       g AS (
         SELECT GROUPING(week_start) AS by_all_weeks, GROUPING(physician_id) AS by_all_physicians,
                to_char(week_start, 'YYYY-MM-DD') AS week_start, to_char(week_start, 'IYYY-"W"IW') AS week, physician_id,
                count(*)::int AS studies,
                count(*) FILTER (WHERE signed_at IS NULL AND started_at < $4::timestamptz - make_interval(secs => $5::float8 * 3600))::int AS overdue,
                count(*) FILTER (WHERE start_basis = 'procedure-end')::int AS basis_procedure_end,
                count(*) FILTER (WHERE start_basis = 'procedure-start')::int AS basis_procedure_start,
                count(*) FILTER (WHERE start_basis = 'opened')::int AS basis_opened,
                ${statsSelect}
         FROM r
         GROUP BY GROUPING SETS ((week_start), (physician_id), ())
       ),
       q AS (
         SELECT count(*)::int AS signed,
                count(*) FILTER (WHERE pressure_vessels > 0)::int AS pressure_studies,
                count(*) FILTER (WHERE pressure_vessels > 0 AND drift_vessels = pressure_vessels)::int AS drift_documented,
                COALESCE(sum(drift_vessels), 0)::int AS drift_vessels,
                COALESCE(sum(drift_outside_vessels), 0)::int AS drift_outside,
                count(*) FILTER (WHERE thermo_vessels > 0)::int AS thermo_studies,
                count(*) FILTER (WHERE thermo_vessels > 0 AND thermo_complete_vessels = thermo_vessels)::int AS thermo_complete,
                COALESCE(sum(vessels), 0)::int AS vessels,
                COALESCE(sum(warned_vessels), 0)::int AS warned
         FROM r WHERE signed_at IS NOT NULL
       ),
       d AS (
         SELECT b AS bin, count(*)::int AS vessels
         FROM r CROSS JOIN LATERAL unnest(r.drift_bins) b
         WHERE r.signed_at IS NOT NULL AND cardinality(r.drift_bins) > 0
         GROUP BY 1
       ),
       e AS (
         SELECT to_char(month, 'YYYY-MM') AS month, endotype, n
         FROM (SELECT date_trunc('month', local_day)::date AS month, COALESCE(endotype, 'unknown') AS endotype, count(*)::int AS n
               FROM r WHERE signed_at IS NOT NULL GROUP BY 1, 2) m
       )
       SELECT (SELECT COALESCE(json_agg(g), '[]') FROM g) AS grouped,
              (SELECT row_to_json(q) FROM q) AS quality,
              (SELECT COALESCE(json_agg(d), '[]') FROM d) AS drift,
              (SELECT COALESCE(json_agg(e ORDER BY e.month, e.endotype), '[]') FROM e) AS endotypes`,
    params: [query.from, query.to, settings.timeZone, now, settings.signatureTargetHours],
  };
}

/**
 * Turnaround and quality figures of a range, all computed by PostgreSQL from `study_turnaround`
 * (kept by triggers; see its migration): per ISO week (weeks of the lab's time zone), per physician
 * (the first signer, or the operator while unsigned) and over the whole range, in one grouping-sets
 * pass; then the quality counts, the drift distribution and the endotype mix per month.
 */
export async function turnaroundFigures(db: DataSource, query: TurnaroundQuery, settings: TurnaroundSettings, now = new Date()): Promise<TurnaroundFigures> {
  const { sql, params } = figuresQuery(query, settings, now);
  const [row] = await db.transaction(async (tx) => {
    await tx.query(`SET LOCAL work_mem = '${figuresWorkMem}'`);
    return tx.query(sql, params);
  });
  const grouped = row.grouped as Record<string, unknown>[];
  const quality = [row.quality];
  const drift = row.drift as { bin: number; vessels: number }[];
  const endotypes = row.endotypes as { month: string; endotype: string; n: number }[];

  const all = (grouped.find((r) => r.by_all_weeks === 1 && r.by_all_physicians === 1) ?? null) as Record<string, number> | null;
  const weekRows = grouped.filter((r) => r.by_all_weeks === 0).sort((a, b) => String(a.week_start).localeCompare(String(b.week_start)));
  const physicianRows = grouped.filter((r) => r.by_all_physicians === 0);

  const ids = physicianRows.map((r) => r.physician_id as string | null).filter((id): id is string => !!id);
  const names = new Map<string, string>(
    ids.length ? (await db.query(`SELECT id, display_name FROM app_user WHERE id = ANY($1)`, [ids])).map((u: { id: string; display_name: string }) => [u.id, u.display_name]) : [],
  );

  const q = quality[0];
  const months = new Map<string, EndotypeMonth>();
  for (const r of endotypes as { month: string; endotype: Endotype | 'unknown'; n: number }[]) {
    const m = months.get(r.month) ?? { month: r.month, counts: {} };
    m.counts[r.endotype] = r.n;
    months.set(r.month, m);
  }
  const qualityFigures: QualityFigures = {
    signedStudies: q.signed,
    pressureStudies: q.pressure_studies,
    driftDocumentedStudies: q.drift_documented,
    driftVessels: q.drift_vessels,
    driftOutsideVessels: q.drift_outside,
    driftBins: driftBins(new Map(drift.map((r: { bin: number; vessels: number }) => [Number(r.bin), r.vessels]))),
    thermoStudies: q.thermo_studies,
    thermoCompleteStudies: q.thermo_complete,
    vessels: q.vessels,
    warnedVessels: q.warned,
    endotypes: [...months.values()],
  };

  const empty = { closed: 0, open: 0, median: null, p90: null };
  return {
    from: query.from,
    to: query.to,
    timeZone: settings.timeZone,
    targetHours: settings.signatureTargetHours,
    studies: all?.studies ?? 0,
    startBasis: Object.fromEntries(startBases.map((b) => [b, all ? all[`basis_${b.replace('-', '_')}`] : 0])) as Record<StartBasis, number>,
    totals: all ? intervalsOf(all) : { toSignature: empty, toCoded: empty, toDelivered: empty, toDone: empty },
    weeks: weekRows.map((r: Record<string, unknown>) => ({ week: r.week as string, weekStart: r.week_start as string, studies: r.studies as number, intervals: intervalsOf(r) })),
    physicians: physicianRows
      .map((r: Record<string, unknown>) => ({
        physicianId: (r.physician_id as string | null) ?? null,
        name: r.physician_id ? (names.get(r.physician_id as string) ?? 'Unknown user') : 'No physician recorded',
        studies: r.studies as number,
        overdue: r.overdue as number,
        intervals: intervalsOf(r),
      }))
      .sort(
        (a: { overdue: number; intervals: IntervalSet; name: string }, b: { overdue: number; intervals: IntervalSet; name: string }) =>
          b.overdue - a.overdue || (b.intervals.toSignature.median ?? -1) - (a.intervals.toSignature.median ?? -1) || a.name.localeCompare(b.name),
      ),
    quality: qualityFigures,
  };
}
