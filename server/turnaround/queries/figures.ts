import type pg from 'pg';
import type { DataSource, QueryRunner } from 'typeorm';
import { auditColumns, auditParameters, type AuditEntry } from '../../audit/audit';
import { slots, type Slots } from '../../reports/signing-slots';
import type { Endotype } from '../../../shared/physiology/types';
import {
  driftBins,
  intervalKeys,
  startBases,
  type EndotypeMonth,
  type IntervalSet,
  type QualityFigures,
  type StartBasis,
  type TurnaroundFigures,
} from '../../../shared/turnaround/figures';
import type { TurnaroundQuery } from '../../../shared/turnaround/query';
import type { TurnaroundSettings } from '../../../shared/settings/lab-settings';
import { localMidnight } from '../../db/local-midnight';


/**
 * The studies of a range of days in the lab's time zone (both ends included), by the time their
 * clock starts: from the first local midnight to the one after the last day. $1 from, $2 to (dates), $3 the time zone.
 */
export const rangeCondition = `t.started_at >= ${localMidnight('$1::date')}
  AND t.started_at < ${localMidnight('$2::date + 1')}`;

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

/** Memory for each statement's sorts: the percentiles of 100,000 studies sort in memory, not on disk. */
export const figuresWorkMem = '32MB';

/** One statement of the figures, with its own parameters. */
export interface FiguresPart {
  name: 'weeks' | 'physicians' | 'totals' | 'quality';
  sql: string;
  params: unknown[];
}

/**
 * The ISO weeks of the range in the lab's time zone: each one's Monday and the instants of its local
 * Monday 00:00 and the next (clipped to the range), so each week reads its own part of the index on
 * `started_at` and no study's local time is worked out row by row. A study is in the week whose local
 * midnights (`localMidnight`) enclose its start, as it is in the range whose local midnights enclose it.
 * $1 from, $2 to, $3 zone.
 */
const weeksOfRange = `
  SELECT m::date AS week_start,
         ${localMidnight('GREATEST(m::date, $1::date)')} AS lo,
         ${localMidnight('LEAST(m::date + 7, $2::date + 1)')} AS hi
  FROM generate_series(($1::date - (extract(isodow FROM $1::date)::int - 1))::timestamp, ($2::date)::timestamp, interval '7 days') m`;

/** The calendar months of the range in the lab's time zone, as `weeksOfRange`. */
const monthsOfRange = `
  SELECT m::date AS month,
         ${localMidnight('GREATEST(m::date, $1::date)')} AS lo,
         ${localMidnight('LEAST((m + interval \'1 month\')::date, $2::date + 1)')} AS hi
  FROM generate_series(date_trunc('month', ($1::date)::timestamp), ($2::date)::timestamp, interval '1 month') m`;

/** The audit row of a request for the figures, its detail completed with the range's studies (`totals`). */
function auditInsert(e: AuditEntry, after: number): string {
  const $ = (i: number) => `$${after + i}`;
  // The parameters after the statement's own are `auditParameters`, in the order of `auditColumns`.
  return `INSERT INTO audit_event (${auditColumns})
          SELECT ${$(1)}::uuid, ${$(2)}::text, ${$(3)}::text, ${$(4)}::text, ${$(5)}::text, ${$(6)}::text, ${$(7)}::text, ${$(8)}::text,
                 ${$(9)}::jsonb || jsonb_build_object('studies', totals.studies)
          FROM totals`;
}

/**
 * The statements behind the figures, each independent of the others so they can run at once on
 * separate connections (`turnaroundFigures` gives them one snapshot). Each reads the range from the
 * covering index on `started_at` (index-only), and each sort is of the few columns it needs. In the
 * order they start (the longest first):
 * - physicians: grouped by physician, with the overdue count now and the physician's name;
 * - weeks: per ISO week of the lab's time zone, a range of the index each (no sort of the range by week);
 * - totals: the whole range, and the clock's start basis;
 * - quality: signed studies counted per local month, endotype and set of drift bands (a hash
 *   aggregate of a few hundred groups), then summed into the quality counts, the drift
 *   distribution and the endotype mix, all of which are sums of counts.
 * With `audit`, the totals statement also records the request (the studies counted in its detail),
 * so the row commits with the figures or not at all.
 * Medians and 90th percentiles are `percentile_cont` of the closed intervals (open ones are counted apart).
 */
export function figuresQueries(query: TurnaroundQuery, settings: TurnaroundSettings, now = new Date(), audit?: AuditEntry): FiguresPart[] {
  const range = [query.from, query.to, settings.timeZone];
  return [
    {
      name: 'physicians',
      sql: `SELECT g.*, u.display_name AS physician_name
            FROM (
              SELECT t.physician_id, count(*)::int AS studies,
                     count(*) FILTER (WHERE t.signed_at IS NULL AND t.started_at < $4::timestamptz - make_interval(secs => $5::float8 * 3600))::int AS overdue,
                     ${statsSelect}
              FROM (SELECT t.physician_id, t.signed_at, t.started_at, ${intervalColumns} FROM study_turnaround t WHERE ${rangeCondition}) t
              GROUP BY t.physician_id
            ) g LEFT JOIN app_user u ON u.id = g.physician_id`,
      params: [...range, now, settings.signatureTargetHours],
    },
    {
      name: 'weeks',
      sql: `SELECT to_char(w.week_start, 'YYYY-MM-DD') AS week_start, to_char(w.week_start, 'IYYY-"W"IW') AS week, s.*
            FROM (${weeksOfRange}) w
            CROSS JOIN LATERAL (
              SELECT count(*)::int AS studies, ${statsSelect}
              FROM (SELECT ${intervalColumns} FROM study_turnaround t WHERE t.started_at >= w.lo AND t.started_at < w.hi) t
            ) s
            WHERE s.studies > 0
            ORDER BY w.week_start`,
      params: range,
    },
    {
      name: 'totals',
      sql: `WITH totals AS (
              SELECT count(*)::int AS studies,
                     count(*) FILTER (WHERE t.start_basis = 'procedure-end')::int AS basis_procedure_end,
                     count(*) FILTER (WHERE t.start_basis = 'procedure-start')::int AS basis_procedure_start,
                     count(*) FILTER (WHERE t.start_basis = 'opened')::int AS basis_opened,
                     ${statsSelect}
              FROM (SELECT t.start_basis, ${intervalColumns} FROM study_turnaround t WHERE ${rangeCondition}) t
            )${audit ? `, logged AS (${auditInsert(audit, range.length)})` : ''}
            SELECT * FROM totals`,
      params: audit ? [...range, ...auditParameters({ ...audit, detail: audit.detail ?? {} })] : range,
    },
    {
      name: 'quality',
      sql: `WITH g AS MATERIALIZED (
              SELECT m.month, s.*
              FROM (${monthsOfRange}) m
              CROSS JOIN LATERAL (
                SELECT COALESCE(t.endotype, 'unknown') AS endotype, t.drift_bins, count(*)::int AS signed,
                       count(*) FILTER (WHERE t.pressure_vessels > 0)::int AS pressure_studies,
                       count(*) FILTER (WHERE t.pressure_vessels > 0 AND t.drift_vessels = t.pressure_vessels)::int AS drift_documented,
                       sum(t.drift_vessels)::int AS drift_vessels,
                       sum(t.drift_outside_vessels)::int AS drift_outside,
                       count(*) FILTER (WHERE t.thermo_vessels > 0)::int AS thermo_studies,
                       count(*) FILTER (WHERE t.thermo_vessels > 0 AND t.thermo_complete_vessels = t.thermo_vessels)::int AS thermo_complete,
                       sum(t.vessels)::int AS vessels,
                       sum(t.warned_vessels)::int AS warned
                FROM study_turnaround t
                WHERE t.started_at >= m.lo AND t.started_at < m.hi AND t.signed_at IS NOT NULL
                GROUP BY 1, 2
              ) s
            )
            SELECT (SELECT row_to_json(q) FROM (
                      SELECT COALESCE(sum(signed), 0)::int AS signed, COALESCE(sum(pressure_studies), 0)::int AS pressure_studies,
                             COALESCE(sum(drift_documented), 0)::int AS drift_documented, COALESCE(sum(drift_vessels), 0)::int AS drift_vessels,
                             COALESCE(sum(drift_outside), 0)::int AS drift_outside, COALESCE(sum(thermo_studies), 0)::int AS thermo_studies,
                             COALESCE(sum(thermo_complete), 0)::int AS thermo_complete, COALESCE(sum(vessels), 0)::int AS vessels,
                             COALESCE(sum(warned), 0)::int AS warned
                      FROM g) q) AS quality,
                   (SELECT COALESCE(json_agg(d), '[]') FROM (
                      SELECT b AS bin, sum(g.signed)::int AS vessels FROM g CROSS JOIN LATERAL unnest(g.drift_bins) b GROUP BY b) d) AS drift,
                   (SELECT COALESCE(json_agg(e ORDER BY e.month, e.endotype), '[]') FROM (
                      SELECT to_char(month, 'YYYY-MM') AS month, endotype, sum(signed)::int AS n FROM g GROUP BY 1, 2) e) AS endotypes`,
      params: range,
    },
  ];
}

type Rows = Record<string, unknown>[];
type PartRows = Record<FiguresPart['name'], Rows>;

/**
 * Settings of each figures transaction: sorts in memory; no JIT compilation, which the planner's
 * estimate of the per-week reads (a thousand weeks, not the range's 53) would otherwise ask for and
 * which takes far longer than these statements run.
 */
export const figuresSettings = `SET LOCAL work_mem = '${figuresWorkMem}'; SET LOCAL jit = off`;

/**
 * Connections one figures request may hold beside the pool's other users: the statements run at once
 * on up to this many (the machine's cores do the sorting), all in one snapshot. One request at a
 * time per pool computes figures this way, so requests never hold parts of the pool while waiting
 * for more; with a small pool the statements run one after another in one transaction.
 */
const PARALLEL_CONNECTIONS = 3;
const figureSlots = new WeakMap<DataSource, Slots>();

function poolSizeOf(db: DataSource): number {
  const max = (db.options as { extra?: { max?: number } }).extra?.max;
  return typeof max === 'number' ? max : 10;
}

/** Runs the parts in one REPEATABLE READ transaction on one connection. */
async function runSequentially(db: DataSource, parts: FiguresPart[]): Promise<PartRows> {
  return db.transaction('REPEATABLE READ', async (tx) => {
    await tx.query(figuresSettings);
    const out = {} as PartRows;
    for (const part of parts) out[part.name] = await tx.query(part.sql, part.params);
    return out;
  });
}

/**
 * Runs the parts at once on separate connections, all reading the same snapshot: the first
 * connection exports its snapshot and keeps its transaction open until every other one has taken it
 * (SET TRANSACTION SNAPSHOT), so the weeks, physicians, totals and quality agree with each other.
 */
async function runConcurrently(db: DataSource, parts: FiguresPart[], connections: number): Promise<PartRows> {
  const runners = Array.from({ length: Math.min(connections, parts.length) }, () => db.createQueryRunner());
  const open: QueryRunner[] = [];
  // Each connection's setup is one round trip (several statements, no parameters: the simple protocol).
  const setup = async (runner: QueryRunner, statements: string): Promise<pg.QueryResult[]> => {
    const client = (await runner.connect()) as pg.PoolClient;
    open.push(runner);
    return (await client.query(statements)) as unknown as pg.QueryResult[];
  };
  try {
    const [first, ...others] = runners;
    const began = await setup(first, `BEGIN ISOLATION LEVEL REPEATABLE READ; ${figuresSettings}; SELECT pg_export_snapshot() AS snapshot`);
    const snapshot = String(began[began.length - 1].rows[0].snapshot);
    if (!/^[0-9A-F-]+$/i.test(snapshot)) throw new Error('unexpected snapshot identifier');
    // Longest first, each connection taking the next statement when it is free; the first one starts
    // at once, the others as soon as they hold the snapshot (the first one's transaction is still open).
    const queue = [...parts];
    const out = {} as PartRows;
    const work = async (runner: QueryRunner) => {
      for (let part = queue.shift(); part; part = queue.shift()) out[part.name] = await runner.query(part.sql, part.params);
    };
    // Every connection settles before any is given back, whichever fails.
    const settled = await Promise.allSettled([
      work(first),
      ...others.map(async (runner) => {
        await setup(runner, `BEGIN ISOLATION LEVEL REPEATABLE READ; SET TRANSACTION SNAPSHOT '${snapshot}'; ${figuresSettings}`);
        await work(runner);
      }),
    ]);
    const failure = settled.find((r): r is PromiseRejectedResult => r.status === 'rejected');
    if (failure) throw failure.reason;
    await Promise.all(runners.map((runner) => runner.query('COMMIT')));
    return out;
  } catch (error) {
    await Promise.all(open.map((runner) => runner.query('ROLLBACK').catch(() => undefined)));
    throw error;
  } finally {
    await Promise.all(runners.map((runner) => runner.release()));
  }
}

/** The rows of each statement of the figures, at once when the pool has room. */
export async function readFigureParts(db: DataSource, parts: FiguresPart[]): Promise<PartRows> {
  // Two connections stay for the session store and the audit row of other requests.
  const connections = Math.min(PARALLEL_CONNECTIONS, poolSizeOf(db) - 2);
  if (connections < 2) return runSequentially(db, parts);
  let gate = figureSlots.get(db);
  if (!gate) figureSlots.set(db, (gate = slots(1)));
  return gate.run(() => runConcurrently(db, parts, connections));
}

/**
 * Turnaround and quality figures of a range, all computed by PostgreSQL from `study_turnaround`
 * (kept by triggers; see its migration): per ISO week (weeks of the lab's time zone), per physician
 * (the first signer, or the operator while unsigned) and over the whole range; then the quality
 * counts, the drift distribution and the endotype mix per month (`figuresQueries`).
 */
export async function turnaroundFigures(
  db: DataSource,
  query: TurnaroundQuery,
  settings: TurnaroundSettings,
  now = new Date(),
  audit?: AuditEntry,
): Promise<TurnaroundFigures> {
  const rows = await readFigureParts(db, figuresQueries(query, settings, now, audit));
  const all = (rows.totals[0] ?? null) as Record<string, number> | null;
  const q = rows.quality[0].quality as Record<string, number>;
  const drift = rows.quality[0].drift as { bin: number; vessels: number }[];
  const endotypes = rows.quality[0].endotypes as { month: string; endotype: Endotype | 'unknown'; n: number }[];

  const months = new Map<string, EndotypeMonth>();
  for (const r of endotypes) {
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
    driftBins: driftBins(new Map(drift.map((r) => [Number(r.bin), r.vessels]))),
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
    totals: all && all.studies > 0 ? intervalsOf(all) : { toSignature: empty, toCoded: empty, toDelivered: empty, toDone: empty },
    weeks: rows.weeks.map((r) => ({ week: r.week as string, weekStart: r.week_start as string, studies: r.studies as number, intervals: intervalsOf(r) })),
    physicians: rows.physicians
      .map((r) => ({
        physicianId: (r.physician_id as string | null) ?? null,
        name: r.physician_id ? ((r.physician_name as string | null) ?? 'Unknown user') : 'No physician recorded',
        studies: r.studies as number,
        overdue: r.overdue as number,
        intervals: intervalsOf(r),
      }))
      .sort((a, b) => b.overdue - a.overdue || (b.intervals.toSignature.median ?? -1) - (a.intervals.toSignature.median ?? -1) || a.name.localeCompare(b.name)),
    quality: qualityFigures,
  };
}
