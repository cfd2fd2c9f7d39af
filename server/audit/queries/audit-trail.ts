import type { DataSource, EntityManager } from 'typeorm';
import { labelOfAction, type AuditFilters, type AuditOutcomeCode, type AuditTrailItem } from '../../../shared/audit/trail';
import { bigintIdPattern, decodeKeysetCursor, encodeKeysetCursor, type KeysetCursor } from '../../db/keyset-cursor';
import { uuidPattern } from '../../../shared/uuid';
import { auditColumns, auditParameters, type AuditEntry } from '../audit';

/** The SQL type of each of `auditColumns`, in its order. */
const casts = ['uuid', 'text', 'text', 'text', 'text', 'text', 'text', 'text', 'jsonb'] as const;

export type Db = DataSource | EntityManager;

/**
 * Searching the audit trail. Newest first in a stable order, (recorded_at DESC, id DESC), one keyset
 * page at a time: the cursor is the last row's (recorded_at, id), and the next page is the rows
 * strictly below it, so events written while someone pages land above the first page, never in the
 * middle as duplicates or gaps.
 *
 * Each first page is read from an index (migration AuditSearch1765410000000):
 * - no key filter: `audit_event_at_idx` (recorded_at, id), a date range being a range of it;
 * - by action: `audit_event_action_at_idx` (action, recorded_at, id);
 * - by failure or refusal: `audit_event_unsuccessful_at_idx`, a partial index of the rare events;
 * - by patient or study: the studies are looked up first (patient by MRN or family name, study by
 *   accession), then their events read from `audit_event_study_at_idx` (a study has a handful);
 * - by user: the people are looked up first, then for each one the newest rows of
 *   `audit_event_actor_at_idx` are read (a LATERAL join with the page size as limit) and merged,
 *   so a busy user costs a page, not their history.
 */

/**
 * A user filter matching at most this many people reads each one's newest rows (LATERAL); a study
 * or patient filter matching at most this many studies reads their events through the study index
 * (a study has a handful). Beyond either, the filter is applied along the time index instead.
 */
const MAX_KEYS = { users: 200, studies: 5000 } as const;

const UUID_SQL = `'^[0-9a-fA-F]{8}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{12}$'`;
const DAY = /^\d{4}-\d{2}-\d{2}$/;

/** One audit row with the patient, study or user it names, as the trail and its exports read it. */
export interface AuditTrailRow {
  id: string;
  recorded_at: Date;
  at_key: string;
  actor_user_id: string | null;
  actor_name: string | null;
  actor_role: string | null;
  action: string;
  outcome: AuditOutcomeCode;
  entity_type: string | null;
  entity_id: string | null;
  client_address: string | null;
  detail: Record<string, unknown> | null;
  study_id: string | null;
  accession: string | null;
  family_name: string | null;
  given_name: string | null;
  mrn: string | null;
  user_name: string | null;
}

export type AuditCursor = KeysetCursor;

/** The cursor is the last row's recorded_at (as PostgreSQL prints it, so microseconds survive) and id. */
export function encodeAuditCursor(row: { at_key: string; id: string }): string {
  return encodeKeysetCursor(row.at_key, row.id);
}

export function decodeAuditCursor(cursor: string): AuditCursor {
  return decodeKeysetCursor(cursor, bigintIdPattern);
}

/** Keys a filter resolved to: the ids (maybe none: nothing matches), or `many` when there are too many to drive the search. */
type Keys = { ids: string[] } | { many: true };

interface Resolved {
  studies?: Keys;
  users?: Keys;
}

/** Adds a parameter and returns its placeholder. */
type Param = (value: unknown) => string;

const escapeLike = (s: string) => s.replace(/[\\%_]/g, (c) => `\\${c}`);

/** Studies named by the patient and study filters (both given: the studies that match both). */
function studySelect(f: AuditFilters, p: Param): string | null {
  if (!f.patient && !f.study) return null;
  const where: string[] = [];
  if (f.study) {
    if (uuidPattern.test(f.study)) where.push(`s.id = ${p(f.study.toLowerCase())}::uuid`);
    else {
      const accession = p(f.study);
      where.push(`s.accession IN (${accession}, upper(${accession}))`);
    }
  }
  if (f.patient) {
    const mrn = p(f.patient);
    const family = p(escapeLike(f.patient.toLowerCase()));
    where.push(`s.patient_id IN (SELECT pt.id FROM patient pt WHERE upper(pt.mrn) = upper(${mrn}) OR lower(pt.family_name) LIKE ${family} || '%')`);
  }
  return `SELECT s.id FROM study s WHERE ${where.join(' AND ')}`;
}

/** People named by the user filter: by id, or by part of the name or the start of the e-mail. */
function userSelect(f: AuditFilters, p: Param): string | null {
  if (!f.user) return null;
  if (uuidPattern.test(f.user)) return `SELECT ${p(f.user.toLowerCase())}::uuid AS id`;
  const text = p(escapeLike(f.user));
  return `SELECT u.id FROM app_user u WHERE u.display_name ILIKE '%' || ${text} || '%' OR u.email ILIKE ${text} || '%'`;
}

const keySelects = { studies: studySelect, users: userSelect } as const;

async function resolveKeys(db: Db, f: AuditFilters): Promise<Resolved> {
  const resolved: Resolved = {};
  // A study id alone needs no look-up (and its events outlive the study's row).
  if (f.study && uuidPattern.test(f.study) && !f.patient) resolved.studies = { ids: [f.study.toLowerCase()] };
  for (const name of ['studies', 'users'] as const) {
    if (resolved[name]) continue;
    const params: unknown[] = [];
    const sql = keySelects[name](f, (v) => (params.push(v), `$${params.length}`));
    if (!sql) continue;
    // SQL: the same select is the page query's subselect when it matches too many (keySelects).
    const rows: { id: string }[] = await db.query(`${sql} LIMIT ${MAX_KEYS[name] + 1}`, params);
    resolved[name] = rows.length > MAX_KEYS[name] ? { many: true } : { ids: rows.map((r) => r.id) };
  }
  return resolved;
}

/** Columns the trail reads, joined to what they name: `page` holds the ids of the page's rows. */
const displaySelect = `
  SELECT a.id::text AS id, a.recorded_at, a.recorded_at::text AS at_key, a.actor_user_id, a.actor_name, a.actor_role,
         a.action, a.outcome, a.entity_type, a.entity_id, a.client_address, a.detail, a.study_id,
         s.accession, p.family_name, p.given_name, p.mrn, u.display_name AS user_name
  FROM page JOIN audit_event a ON a.id = page.id
  LEFT JOIN study s ON s.id = a.study_id
  LEFT JOIN patient p ON p.id = s.patient_id
  LEFT JOIN app_user u ON a.entity_type = 'user' AND u.id = CASE WHEN a.entity_id ~ ${UUID_SQL} THEN a.entity_id::uuid END
  ORDER BY a.recorded_at DESC, a.id DESC`;

/**
 * The SQL of one page (`limit` rows after `cursor`) under the filters, with the keys already resolved.
 * The page itself selects only (id, recorded_at), so a search through an index whose key holds all it
 * filters on never visits the table; the page's rows are then read by primary key and joined.
 */
export function pageQuery(
  f: AuditFilters,
  resolved: Resolved,
  cursor: AuditCursor | null,
  limit: number,
  audit?: { entry: AuditEntry; shown: number },
): { sql: string; params: unknown[] } {
  const params: unknown[] = [];
  const p = (value: unknown) => {
    params.push(value);
    return `$${params.length}`;
  };
  const where: string[] = [];
  if (f.action) where.push(`a.action = ${p(f.action)}`);
  // Failures and refusals are rare: the literal lets the planner use the partial index of unsuccessful events.
  if (f.outcome) where.push(`a.outcome = ${p(f.outcome)}${f.outcome === 'success' ? '' : ` AND a.outcome <> 'success'`}`);
  // A day given alone is the database session's day, as the trail's query promises (shared/audit/trail.ts):
  // the audit screen sends the instants that bound the reader's own local days, not days; a day here is
  // for a hand-written query and is not the lab's day (server/db/local-midnight.ts).
  if (f.from) where.push(DAY.test(f.from) ? `a.recorded_at >= ${p(f.from)}::date` : `a.recorded_at >= ${p(f.from)}::timestamptz`);
  if (f.to) where.push(DAY.test(f.to) ? `a.recorded_at < (${p(f.to)}::date + 1)` : `a.recorded_at < ${p(f.to)}::timestamptz`);
  if (cursor) where.push(`(a.recorded_at, a.id) < (${p(cursor.at)}::timestamptz, ${p(cursor.id)}::bigint)`);

  const columns = { studies: 'study_id', users: 'actor_user_id' } as const;
  // A few people (and no study filter) drive the search: each one's newest rows, merged.
  const users = resolved.users;
  const lateral = !resolved.studies && users && 'ids' in users ? users.ids : null;
  for (const name of ['studies', 'users'] as const) {
    const keys = resolved[name];
    if (!keys || (name === 'users' && lateral)) continue;
    if ('ids' in keys) where.push(`a.${columns[name]} = ANY(${p(keys.ids)}::uuid[])`);
    else where.push(`a.${columns[name]} IN (${keySelects[name](f, p)})`);
  }
  const n = p(limit);
  const order = `ORDER BY a.recorded_at DESC, a.id DESC`;
  let page: string;
  if (lateral) {
    const keys = p(lateral);
    page = `
      SELECT a.id, a.recorded_at FROM unnest(${keys}::uuid[]) AS k(key)
      CROSS JOIN LATERAL (
        SELECT a.id, a.recorded_at FROM audit_event a
        WHERE a.actor_user_id = k.key${where.length ? ` AND ${where.join(' AND ')}` : ''}
        ${order} LIMIT ${n}
      ) a
      ${order} LIMIT ${n}`;
  } else {
    page = `SELECT a.id, a.recorded_at FROM audit_event a ${where.length ? `WHERE ${where.join(' AND ')}` : ''} ${order} LIMIT ${n}`;
  }
  return { sql: `WITH page AS (${page})${audit ? `, ${auditInsert(audit.entry, audit.shown, p)}` : ''} ${displaySelect}`, params };
}

/**
 * The audit row of a search, written by the statement that reads the page (one round trip, one
 * commit): its detail gets `returned`, the rows shown (at most `shown`; the page reads one more to
 * know whether another page follows). A statement that fails writes neither.
 */
function auditInsert(entry: AuditEntry, shown: number, p: Param): string {
  // `auditParameters` in the order of `auditColumns`; the detail, an object always, gets `returned`.
  const values = auditParameters({ ...entry, detail: entry.detail ?? {} });
  return `logged AS (
    INSERT INTO audit_event (${auditColumns})
    SELECT ${casts.map((cast, i) => `${p(values[i])}::${cast}`).join(', ')}
           || jsonb_build_object('returned', LEAST((SELECT count(*) FROM page), ${p(shown)}::int))
  )`;
}

/** Filters and keys, resolved once for a search or an export. */
export interface PreparedSearch {
  filters: AuditFilters;
  resolved: Resolved;
  /** True when a filter matched nothing, so no query is needed. */
  empty: boolean;
}

export async function prepareSearch(db: Db, filters: AuditFilters): Promise<PreparedSearch> {
  const resolved = await resolveKeys(db, filters);
  const empty = [resolved.studies, resolved.users].some((k) => k && 'ids' in k && k.ids.length === 0);
  return { filters, resolved, empty };
}

/**
 * `limit` rows after the cursor (null: from the newest). With `audit`, the same statement records
 * the search (see `auditInsert`); a search that needs no statement reads nothing and records
 * nothing (its caller records it).
 */
export async function loadAuditRows(
  db: Db,
  search: PreparedSearch,
  cursor: AuditCursor | null,
  limit: number,
  audit?: { entry: AuditEntry; shown: number },
): Promise<AuditTrailRow[]> {
  if (search.empty) return [];
  // SQL: keyset page with its audit row in one statement (a data-modifying WITH); plans in migration AuditSearch1765410000000.
  const { sql, params } = pageQuery(search.filters, search.resolved, cursor, limit, audit);
  return db.query(sql, params);
}

/**
 * Every row under the filters, newest first, in batches read one keyset page at a time (never the
 * whole result in memory). Rows written after the export began are above its first row, so they are
 * not part of it. Stops after `max` rows and then gives the cursor to continue from.
 */
export async function* auditRowBatches(
  db: Db,
  filters: AuditFilters,
  options: { cursor?: string; batchSize?: number; max?: number } = {},
): AsyncGenerator<AuditTrailRow[], { nextCursor: string | null }> {
  let after = options.cursor ? decodeAuditCursor(options.cursor) : null;
  const batchSize = options.batchSize ?? 1000;
  const max = options.max ?? Number.POSITIVE_INFINITY;
  const search = await prepareSearch(db, filters);
  let sent = 0;
  while (sent < max) {
    const want = Math.min(batchSize, max - sent);
    const rows = await loadAuditRows(db, search, after, want + 1);
    const batch = rows.slice(0, want);
    if (batch.length) yield batch;
    sent += batch.length;
    if (rows.length <= want) return { nextCursor: null };
    after = { at: batch[batch.length - 1].at_key, id: batch[batch.length - 1].id };
  }
  return { nextCursor: after ? encodeAuditCursor({ at_key: after.at, id: after.id }) : null };
}

const entityWords: Record<string, [one: string, list: string]> = {
  study: ['Study', 'Study list'],
  'study-coding': ['Study coding', 'Study coding'],
  'code-suggestions': ['Code suggestions', 'Code suggestions'],
  'report-delivery': ['Report delivery', 'Report deliveries'],
  patient: ['Patient', 'Patient list'],
  user: ['User', 'User list'],
  attachment: ['Attachment', 'Attachments'],
  'audit-event': ['Audit event', 'Audit trail'],
};

/** The patient's name, MRN and accession for an event on a study; the user's name for one on a user; else the kind of record. */
export function targetOf(r: Pick<AuditTrailRow, 'entity_type' | 'entity_id' | 'family_name' | 'given_name' | 'mrn' | 'accession' | 'user_name'>): string | null {
  if (r.family_name) return [`${r.family_name}, ${r.given_name ?? ''}`.trim(), r.mrn ? `MRN ${r.mrn}` : null, r.accession].filter(Boolean).join(' · ');
  if (r.user_name) return r.user_name;
  if (!r.entity_type) return null;
  const [one, list] = entityWords[r.entity_type] ?? [r.entity_type, r.entity_type];
  return r.entity_id ? one : list;
}

export function toTrailItem(r: AuditTrailRow): AuditTrailItem {
  return {
    id: r.id,
    recordedAt: r.recorded_at.toISOString(),
    actor: r.actor_name,
    actorRole: r.actor_role,
    action: r.action,
    actionLabel: labelOfAction(r.action),
    outcome: r.outcome,
    entityType: r.entity_type,
    entityId: r.entity_id,
    target: targetOf(r),
    studyId: r.study_id,
    clientAddress: r.client_address,
  };
}
