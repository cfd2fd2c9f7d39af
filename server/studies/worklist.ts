import type { DataSource } from 'typeorm';
import { WORKLIST_PAGE_SIZE, type WorklistQuery } from '../../shared/study/worklist';
import { decodeKeysetCursor, encodeKeysetCursor, uuidIdPattern } from '../db/keyset-cursor';
import { parseSearch, type ParsedSearch } from '../../shared/study/search';
import type { AuditActor } from '../audit/audit';
import { preparedQuery } from '../db/prepared';


/**
 * One study as lists show it (worklist, awaiting signature, turnaround): `SELECT … FROM` a study with its
 * patient and operator; callers add WHERE and ORDER BY. `sort_key` is the sort key as text (for cursors).
 */
export const summarySelect = `
  SELECT s.id, s.accession, s.state, s.procedure_started_at, s.procedure_ended_at, s.indication, s.version,
         s.sort_at::text AS sort_key, s.sort_at,
         p.mrn, p.family_name, p.given_name, to_char(p.birth_date, 'YYYY-MM-DD') AS birth_date, p.sex,
         u.display_name AS operator_name
  FROM study s JOIN patient p ON p.id = s.patient_id LEFT JOIN app_user u ON u.id = s.operator_id`;

/** An instant as `Date.prototype.toISOString` writes it (UTC, milliseconds, `Z`). */
const isoInstant = (column: string) => `to_char(${column} AT TIME ZONE 'UTC', 'YYYY-MM-DD"T"HH24:MI:SS.MS"Z"')`;

/**
 * One study as every list shows it (a `WorklistItem`), built by PostgreSQL from the columns of
 * `summarySelect` in the row named `row`: the worklist aggregates it into its page's JSON, the other
 * lists (awaiting signature, the chief's unsigned studies) read it as one column, parsed by the driver.
 */
export const summaryJson = (row: string) => `json_build_object(
    'id', ${row}.id, 'accession', ${row}.accession, 'state', ${row}.state,
    'procedureStartedAt', ${isoInstant(`${row}.procedure_started_at`)}, 'procedureEndedAt', ${isoInstant(`${row}.procedure_ended_at`)},
    'sortAt', ${isoInstant(`${row}.sort_at`)}, 'indication', ${row}.indication, 'operatorName', ${row}.operator_name, 'version', ${row}.version,
    'patient', json_build_object('mrn', ${row}.mrn, 'familyName', ${row}.family_name, 'givenName', ${row}.given_name, 'birthDate', ${row}.birth_date, 'sex', ${row}.sex))`;

const escapeLike = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

/** The patients a search names, as a condition on `p` (patient) that each arm of which an index answers. */
function patientMatch(search: ParsedSearch, raw: string, param: (v: unknown) => string): string {
  const arms = [`p.mrn = ${param(raw.trim())}`, `upper(p.mrn) = ${param(search.id)}`];
  if (search.partialId) {
    arms.push(`upper(p.mrn) LIKE ${param(`${escapeLike(search.id)}%`)}`);
    arms.push(`reverse(upper(p.mrn)) LIKE ${param(`${escapeLike([...search.id].reverse().join(''))}%`)}`);
  }
  for (const name of search.names) {
    const parts: string[] = [];
    if (name.family) parts.push(`lower(p.family_name) LIKE ${param(`${escapeLike(name.family)}%`)}`);
    if (name.given) parts.push(`lower(p.given_name) LIKE ${param(`${escapeLike(name.given)}%`)}`);
    if (parts.length) arms.push(`(${parts.join(' AND ')})`);
  }
  return `(${arms.join(' OR ')})`;
}

/** Up to this many matching patients, search goes patient-first (see pageStatement). */
const patientLookupCap = 200;

/**
 * The page size as a literal of the statement, not a parameter: PostgreSQL plans a named statement
 * once only when its generic plan costs about what a plan for the values does, and with `LIMIT $n` the
 * generic plan assumes a tenth of the table, so the page was planned again on every request.
 */
function pageLimit(limit: number): number {
  if (!Number.isInteger(limit) || limit < 1 || limit > 1000) throw new RangeError(`Not a page size: ${limit}`);
  return limit;
}

/** The page's statement: the filters as a WHERE over `summarySelect`, newest first, one row more than the page. */
async function pageStatement(db: DataSource, query: WorklistQuery) {
  const where: string[] = [];
  const values: unknown[] = [];
  const param = (v: unknown) => {
    values.push(v);
    return `$${values.length}`;
  };
  if (query.state) where.push(`s.state = ${param(query.state)}`);
  if (query.operatorId) where.push(`s.operator_id = ${param(query.operatorId)}`);
  if (query.from) where.push(`s.sort_at >= ${param(query.from)}::timestamptz`);
  if (query.to) where.push(`s.sort_at < ${param(query.to)}::timestamptz`);
  if (query.q) {
    // Patients first, through their own indexes (MRN as typed or in capitals, its first or last
    // digits, family and given name prefixes); then the studies of those patients. Mixing patient
    // and study columns in one OR would force a walk of the whole worklist for a rare name. A very
    // common prefix falls back to that walk, which is fast exactly when matches are dense.
    const search = parseSearch(query.q);
    const lookup: unknown[] = [];
    const patients: { id: string }[] = await db.query(
      `SELECT id FROM patient p WHERE ${patientMatch(search, query.q, (v) => (lookup.push(v), `$${lookup.length}`))} LIMIT ${patientLookupCap + 1}`,
      lookup,
    );
    const accession = param(search.id);
    if (patients.length <= patientLookupCap) {
      where.push(`(s.patient_id = ANY(${param(patients.map((p) => p.id))}::uuid[]) OR s.accession = ${accession})`);
    } else {
      where.push(`(s.accession = ${accession} OR ${patientMatch(search, query.q, param)})`);
    }
  }
  if (query.cursor) {
    const { at: sortKey, id } = decodeKeysetCursor(query.cursor, uuidIdPattern);
    where.push(`(s.sort_at, s.id) < (${param(sortKey)}::timestamptz, ${param(id)}::uuid)`);
  }
  const pageSql = `${summarySelect}
     ${where.length ? `WHERE ${where.join(' AND ')}` : ''}
     ORDER BY s.sort_at DESC, s.id DESC
     LIMIT ${pageLimit(query.limit) + 1}`;
  return { pageSql, values, param };
}

/**
 * The worklist page as the API answers it (a `WorklistPage` as JSON text, items as `summaryJson`
 * shapes them), with the page's audit row appended by the same statement: the filters, the number
 * of studies returned and their ids in the order shown. The row is committed before the page is
 * answered and costs no round trip of its own.
 *
 * The rows are shaped into JSON by PostgreSQL: this is the busiest read of the app, and parsing 25
 * rows of 15 columns (dates included) into objects only to serialise them again cost more of the
 * server's time per request than the rest of the route together (scripts/bench-load.ts).
 */
export async function worklistPageJson(db: DataSource, query: WorklistQuery, viewer: AuditActor): Promise<string> {
  const { pageSql, values, param } = await pageStatement(db, query);
  // One row more than the page is read (to know whether a next page exists); the audit row names
  // only the studies shown. A data-modifying CTE runs exactly once, whether or not it is read.
  const detail = param(JSON.stringify(query));
  const limit = pageLimit(query.limit);
  const [row] = await preparedQuery<{ items: string; fetched: number; last_sort_key: string | null; last_id: string | null }>(
    db,
    `WITH page AS MATERIALIZED (${pageSql}),
     shown AS MATERIALIZED (SELECT * FROM page ORDER BY sort_at DESC, id DESC LIMIT ${limit}),
     audit AS (
       INSERT INTO audit_event (actor_user_id, actor_name, actor_role, action, entity_type, client_address, outcome, detail)
       SELECT ${param(viewer.actorUserId ?? null)}::uuid, ${param(viewer.actorName ?? null)}::text, ${param(viewer.actorRole ?? null)}::text,
              'search', 'study', ${param(viewer.clientAddress ?? null)}::text, 'success',
              ${detail}::jsonb || jsonb_build_object('returned', count(*), 'studyIds', coalesce(jsonb_agg(id ORDER BY sort_at DESC, id DESC), '[]'::jsonb))
       FROM shown
     )
     SELECT coalesce(json_agg(${summaryJson('shown')} ORDER BY sort_at DESC, id DESC), '[]')::text AS items,
            (SELECT count(*) FROM page)::int AS fetched,
            (array_agg(sort_key ORDER BY sort_at, id))[1] AS last_sort_key,
            (array_agg(id::text ORDER BY sort_at, id))[1] AS last_id
     FROM shown`,
    values,
    // The plain worklist and its filters at the screens' page size ride one index whatever the values,
    // and are kept prepared (a few texts per connection). A search's plan depends on how many patients
    // it found, and other page sizes are rare: planned for their values each time, never kept, so no
    // request can make a connection hold one prepared statement per page size.
    { prepare: !query.q && query.limit === WORKLIST_PAGE_SIZE },
  );
  const nextCursor = row.fetched > query.limit && row.last_sort_key && row.last_id ? encodeKeysetCursor(row.last_sort_key, row.last_id) : null;
  return `{"items":${row.items},"nextCursor":${JSON.stringify(nextCursor)}}`;
}
