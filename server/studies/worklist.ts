import type { DataSource } from 'typeorm';
import type { WorklistItem, WorklistPage, WorklistQuery } from '../../shared/study/worklist';
import { decodeKeysetCursor, encodeKeysetCursor, uuidIdPattern } from '../db/keyset-cursor';
import { parseSearch, type ParsedSearch } from '../../shared/study/search';

/**
 * One study as lists show it (worklist, coding queue, turnaround): `SELECT … FROM` a study with its
 * patient and operator; callers add WHERE and ORDER BY. `sort_key` is the sort key as text (for cursors).
 */
export const summarySelect = `
  SELECT s.id, s.accession, s.state, s.procedure_started_at, s.procedure_ended_at, s.indication, s.version,
         s.sort_at::text AS sort_key, s.sort_at,
         p.mrn, p.family_name, p.given_name, to_char(p.birth_date, 'YYYY-MM-DD') AS birth_date, p.sex,
         u.display_name AS operator_name
  FROM study s JOIN patient p ON p.id = s.patient_id LEFT JOIN app_user u ON u.id = s.operator_id`;

export function toSummary(r: Record<string, never>): WorklistItem {
  return {
    id: r.id,
    accession: r.accession,
    state: r.state,
    procedureStartedAt: (r.procedure_started_at as Date | null)?.toISOString() ?? null,
    procedureEndedAt: (r.procedure_ended_at as Date | null)?.toISOString() ?? null,
    sortAt: (r.sort_at as Date).toISOString(),
    indication: r.indication,
    operatorName: r.operator_name,
    version: r.version,
    patient: { mrn: r.mrn, familyName: r.family_name, givenName: r.given_name, birthDate: r.birth_date, sex: r.sex },
  };
}

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

/** Up to this many matching patients, search goes patient-first (see listStudies). */
const patientLookupCap = 200;

/**
 * Studies newest first (procedure start, or when the record was opened), filtered, one page at a
 * time by keyset: `(sort_at, id) < cursor` rides the worklist indexes however deep the page.
 */
export async function listStudies(db: DataSource, query: WorklistQuery): Promise<WorklistPage> {
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
  const rows = await db.query(
    `${summarySelect}
     ${where.length ? `WHERE ${where.join(' AND ')}` : ''}
     ORDER BY s.sort_at DESC, s.id DESC
     LIMIT ${param(query.limit + 1)}`,
    values,
  );
  const page = rows.slice(0, query.limit);
  const last = page[page.length - 1];
  return {
    items: page.map(toSummary),
    nextCursor: rows.length > query.limit && last ? encodeKeysetCursor(last.sort_key, last.id) : null,
  };
}
