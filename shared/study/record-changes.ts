import { fieldLabel, valueText } from './field-labels';
import { isObject, isRowList, sameValue, type PathStep } from './merge';

/** One field that differs between two versions of a study record. */
export interface RecordChange {
  path: PathStep[];
  /** The row the field belongs to, when it is in a list of rows (a vessel, a dose). */
  row?: Record<string, unknown>;
  before: unknown;
  /** `undefined` when the row was removed. */
  after: unknown;
}

/** The parts of a record a person records; identifiers, versions, times of saving and attachments are not compared. */
const recordedSections = ['patient', 'details', 'setup', 'vessels', 'vasoreactivity', 'findings'] as const;

/**
 * What changed from `before` to `after`, field by field, in the order of the record: rows of a list
 * (vessels, acetylcholine doses) matched by their id, a row added or removed as one change.
 */
export function recordChanges(before: Record<string, unknown>, after: Record<string, unknown>): RecordChange[] {
  const out: RecordChange[] = [];
  for (const section of recordedSections) walk(before[section], after[section], [section], undefined, out);
  return out;
}

function walk(a: unknown, b: unknown, path: PathStep[], row: Record<string, unknown> | undefined, out: RecordChange[]): void {
  if (sameValue(a, b)) return;
  if (isObject(a) && isObject(b)) {
    for (const k of new Set([...Object.keys(a), ...Object.keys(b)])) walk(a[k], b[k], [...path, k], row, out);
    return;
  }
  // Two lists of rows (both empty was the same value above).
  if (isRowList(a) && isRowList(b)) {
    const rowsA = new Map(a.map((r) => [r.id, r]));
    const rowsB = new Map(b.map((r) => [r.id, r]));
    for (const [id, r] of rowsA) if (!rowsB.has(id)) out.push({ path: [...path, { id }], row: r, before: r, after: undefined });
    for (const [id, r] of rowsB) {
      const old = rowsA.get(id);
      if (!old) out.push({ path: [...path, { id }], row: r, before: undefined, after: r });
      else walk(old, r, [...path, { id }], r, out);
    }
    return;
  }
  out.push({ path, row, before: a, after: b });
}

/** A change as a person reads it: "Procedure › Access site: right radial, changed to right femoral" (words, not an arrow: the report's font has none). */
export function changeText(change: RecordChange): string {
  const label = fieldLabel(change.path, change.row);
  if (change.before === undefined && isObject(change.after)) return `${label}: added`;
  if (change.after === undefined && isObject(change.before)) return `${label}: removed`;
  // Codes in words ("right-radial" → "right radial"); a sentence loses its full stop inside the change.
  const words = (v: unknown) => (typeof v === 'string' && /^[a-z0-9]+(-[a-z0-9]+)+$/.test(v) ? v.replace(/-/g, ' ') : typeof v === 'string' ? v.trim().replace(/\.$/, '') : valueText(v));
  return `${label}: ${words(change.before)}, changed to ${words(change.after)}`;
}
