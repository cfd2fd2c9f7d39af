/**
 * Three-way merge of a study's sections, field by field: what both writers started from (base), what
 * this writer holds (mine) and what the other writer saved (theirs). A field changed on one side only
 * takes that side's value; a field changed on both sides to different values is a conflict that a
 * person decides. Rows with an `id` (vessels, acetylcholine doses) are matched by id, so adding a row
 * on one side and editing another row on the other both survive. Lists of plain values (a set of
 * transit times) are one field.
 */

/** One step of a path: an object key, or a row of a list found by its id. */
export type PathStep = string | { id: string };

export interface MergeConflict {
  /** Stable text naming the field, used to record the person's choice. */
  key: string;
  path: PathStep[];
  /** The row the field belongs to, when it is in a list of rows (e.g. { vessel: 'LAD', … }). */
  row?: Record<string, unknown>;
  base: unknown;
  /** `undefined` when that side removed the row. */
  mine: unknown;
  theirs: unknown;
}

export type MergeChoice = 'mine' | 'theirs';

export interface MergeResult<T> {
  /** The merge; an undecided conflict holds the saved (theirs) value, so nothing saved is dropped unseen. */
  merged: T;
  conflicts: MergeConflict[];
}

export const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);
/** A list whose items are rows with an `id` (an empty list counts). */
export const isRowList = (v: unknown): v is Array<Record<string, unknown> & { id: string }> => Array.isArray(v) && v.every((r) => isObject(r) && typeof r.id === 'string');

/** Equality of plain data that tells NaN (text in a number box) from null, and ignores key order. */
export function sameValue(a: unknown, b: unknown): boolean {
  if (Object.is(a, b)) return true;
  if (Array.isArray(a) && Array.isArray(b)) return a.length === b.length && a.every((x, i) => sameValue(x, b[i]));
  if (isObject(a) && isObject(b)) {
    const keys = new Set([...Object.keys(a), ...Object.keys(b)]);
    for (const k of keys) if (!sameValue(a[k], b[k])) return false;
    return true;
  }
  return false;
}

export const conflictKey = (path: PathStep[]) => path.map((s) => (typeof s === 'string' ? s : `[${s.id}]`)).join('.');

/**
 * Merges mine and theirs against base. `choices` (by conflict key) decides conflicts already shown to
 * the person; the conflicts are still returned, so a chooser can show what was decided.
 */
export function threeWayMerge<T>(base: T, mine: T, theirs: T, choices: Readonly<Record<string, MergeChoice>> = {}): MergeResult<T> {
  const conflicts: MergeConflict[] = [];
  const merged = mergeValue(base, mine, theirs, [], undefined, choices, conflicts) as T;
  return { merged, conflicts };
}

function mergeValue(
  base: unknown,
  mine: unknown,
  theirs: unknown,
  path: PathStep[],
  row: Record<string, unknown> | undefined,
  choices: Readonly<Record<string, MergeChoice>>,
  conflicts: MergeConflict[],
): unknown {
  if (sameValue(mine, theirs)) return mine;
  if (sameValue(mine, base)) return theirs;
  if (sameValue(theirs, base)) return mine;
  if (isObject(mine) && isObject(theirs) && (base === undefined || isObject(base))) {
    const b = (base ?? {}) as Record<string, unknown>;
    const out: Record<string, unknown> = {};
    for (const k of new Set([...Object.keys(theirs), ...Object.keys(mine)])) {
      out[k] = mergeValue(b[k], mine[k], theirs[k], [...path, k], row, choices, conflicts);
    }
    return out;
  }
  if (isRowList(mine) && isRowList(theirs) && (base === undefined || isRowList(base))) {
    return mergeRows((base ?? []) as { id: string }[], mine, theirs, path, choices, conflicts);
  }
  const key = conflictKey(path);
  conflicts.push({ key, path, row, base, mine, theirs });
  return choices[key] === 'mine' ? mine : theirs;
}

function mergeRows(
  base: { id: string }[],
  mine: { id: string }[],
  theirs: { id: string }[],
  path: PathStep[],
  choices: Readonly<Record<string, MergeChoice>>,
  conflicts: MergeConflict[],
): unknown[] {
  const byId = (list: { id: string }[]) => new Map(list.map((r) => [r.id, r as Record<string, unknown> & { id: string }]));
  const b = byId(base);
  const m = byId(mine);
  const t = byId(theirs);
  // Order: mine's rows as this writer sees them, then rows only the other writer added.
  const ids = [...mine.map((r) => r.id), ...theirs.map((r) => r.id).filter((id) => !m.has(id))];
  const out: unknown[] = [];
  for (const id of ids) {
    const rowPath = [...path, { id }];
    const [br, mr, tr] = [b.get(id), m.get(id), t.get(id)];
    if (mr && tr) {
      out.push(mergeValue(br, mr, tr, rowPath, tr, choices, conflicts));
      continue;
    }
    // Present on one side only.
    const present = (mr ?? tr)!;
    const removedBy = mr ? 'theirs' : 'mine';
    if (!br) {
      out.push(present); // added on that side
      continue;
    }
    // Removed on one side: fine when the other side left the row as it was; a conflict when it was changed.
    if (sameValue(present, br)) continue;
    const key = conflictKey(rowPath);
    conflicts.push({ key, path: rowPath, row: present, base: br, mine: mr, theirs: tr });
    const choice = choices[key] ?? 'theirs';
    const keep = removedBy === 'mine' ? choice === 'theirs' : choice === 'mine';
    if (keep) out.push(present);
  }
  return out;
}
