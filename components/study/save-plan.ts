/**
 * The decisions behind autosave, as pure functions: what to send from the form (holding back only the
 * fields that cannot be saved), what an error answer means, and whether a failed save is tried again.
 */
import { sectionNames, studySectionsSchema, type SectionName, type StudyRecord, type StudySections } from '../../shared/study/schema';
import { isObject, sameValue } from '../../shared/study/merge';

import { pathOfPointer, pointerOf, problemSlugOf, type Problem } from '../../shared/http/problem';

// ── Which fields go ─────────────────────────────────────────────────────────────────────────────

/** A path inside the sections: section name, then keys and row indexes. */
export type FieldPath = (string | number)[];

export { pathOfPointer };
/** The react-hook-form name of a field ("vessels.0.restPa"). */
export const formNameOf = (path: FieldPath) => path.join('.');

const isRow = (v: unknown): v is Record<string, unknown> & { id: string } => isObject(v) && typeof v.id === 'string';
const isRowList = (v: unknown): v is unknown[] => Array.isArray(v) && v.length > 0 && v.every(isRow);

export function valueAt(root: unknown, path: FieldPath): unknown {
  let v = root;
  for (const step of path) {
    if (v === null || typeof v !== 'object') return undefined;
    v = (v as Record<string | number, unknown>)[step];
  }
  return v;
}

/**
 * Cuts an error's path down to the field a person edits: a row's measurement, a section's field, a
 * whole list of transit times (one box's error holds the list, not one number of it).
 */
export function fieldPathOf(sections: unknown, path: FieldPath): FieldPath {
  const out: FieldPath = [];
  let v: unknown = sections;
  for (const step of path) {
    out.push(step);
    v = (v as Record<string | number, unknown> | undefined)?.[step];
    const container = isRow(v) || isRowList(v) || (isObject(v) && out.length === 1);
    if (!container) break;
  }
  return out;
}

/**
 * The server's value at the same place as `path` in mine: rows are found by id, not by position.
 * `undefined` when the server has no such row (a row added on this device).
 */
function counterpart(mine: unknown, server: unknown, path: FieldPath): unknown {
  let m = mine;
  let s = server;
  for (const step of path) {
    if (typeof step === 'number' && Array.isArray(m) && Array.isArray(s) && isRow(m[step])) {
      const id = (m[step] as { id: string }).id;
      m = m[step];
      s = s.find((r) => isRow(r) && r.id === id);
    } else {
      m = (m as Record<string | number, unknown> | undefined)?.[step];
      s = (s as Record<string | number, unknown> | undefined)?.[step];
    }
    if (s === undefined) return undefined;
  }
  return s;
}

function setAt(root: unknown, path: FieldPath, value: unknown): void {
  let v = root as Record<string | number, unknown>;
  for (const step of path.slice(0, -1)) v = v[step] as Record<string | number, unknown>;
  v[path[path.length - 1]] = value;
}

/** The fields of one section its schema refuses as they stand. */
function refusedFields(sections: StudySections, section: SectionName): FieldPath[] {
  const result = studySectionsSchema.shape[section].safeParse(sections[section]);
  if (result.success) return [];
  return result.error.issues.map((i) => fieldPathOf(sections, [section, ...(i.path as (string | number)[])]));
}

export interface SavePlan {
  /** Sections to send, each with its unsavable fields put back to the server's value. */
  send: Partial<Record<SectionName, unknown>>;
  /** Fields kept on this device until corrected, by JSON pointer ("/vessels/0/restPa"). */
  held: string[];
  /** Sections that cannot be sent at all even with those fields put back. */
  blocked: SectionName[];
}

const clone = <T,>(v: T): T => structuredClone(v);

/**
 * What to send now. `heldByServer` maps a field the server refused to the value it refused (as
 * stable text); it stays held until the person changes it. Every other field that differs from the
 * server copy goes, so one bad box never keeps the rest of its vessel on this device.
 */
export function planSave(values: StudySections, server: StudySections, heldByServer: ReadonlyMap<string, string> = new Map(), stable: (v: unknown) => string = JSON.stringify): SavePlan {
  const plan: SavePlan = { send: {}, held: [], blocked: [] };
  for (const n of sectionNames) {
    if (sameValue(values[n], server[n])) continue;
    const candidate = { ...values, [n]: clone(values[n]) } as StudySections;
    const held = new Map<string, FieldPath>();
    for (const [pointer, refused] of heldByServer) {
      const path = pathOfPointer(pointer);
      if (path[0] === n && stable(valueAt(values, path)) === refused) held.set(pointer, path);
    }
    let valid = false;
    // Putting a field back can reveal another (a row's end before its start): a few rounds settle it.
    for (let round = 0; round < 4; round++) {
      for (const path of held.values()) setAt(candidate, path, counterpart(values, server, path) ?? (Array.isArray(valueAt(values, path)) ? [] : null));
      const refused = refusedFields(candidate, n);
      if (refused.length === 0) {
        valid = true;
        break;
      }
      const more = refused.filter((p) => !held.has(pointerOf(p)));
      if (more.length === 0) break;
      for (const p of more) held.set(pointerOf(p), p);
    }
    plan.held.push(...held.keys());
    if (!valid) plan.blocked.push(n);
    else if (!sameValue(candidate[n], server[n])) plan.send[n] = candidate[n];
  }
  return plan;
}

// ── What an error answer means ──────────────────────────────────────────────────────────────────

/** The parts of a failed request the decisions need (an ApiError has them). */
export interface SaveFailure {
  status: number;
  problem?: Partial<Pick<Problem, 'type' | 'detail' | 'errors'>> & { current?: StudyRecord };
}

export type StopReason = 'signed-out' | 'signed' | 'forbidden' | 'refused' | 'gone';

export type SaveDecision =
  /** The server was not reached or failed: the edits stay on this device and go again. */
  | { kind: 'retry' }
  /** Another writer saved first: merge against the version both started from. */
  | { kind: 'stale'; current: StudyRecord }
  /** The server refused these fields: hold them back, send the rest. */
  | { kind: 'fields'; errors: { pointer: string; detail: string }[] }
  /** Sending again cannot help: the person must act. */
  | { kind: 'stop'; reason: StopReason; message: string };


export function decideOnSaveError(failure: SaveFailure): SaveDecision {
  const { status, problem } = failure;
  const slug = problemSlugOf(problem?.type);
  if (status === 409 && slug === 'stale-version' && problem?.current) return { kind: 'stale', current: problem.current };
  if ((status === 400 || status === 409 || status === 422) && problem?.errors?.length) return { kind: 'fields', errors: problem.errors };
  if (status === 401) return { kind: 'stop', reason: 'signed-out', message: 'Your session has ended. Your edits are kept on this device: sign in again to send them.' };
  if (status === 409 && slug === 'study-signed')
    return { kind: 'stop', reason: 'signed', message: 'The study was signed meanwhile, so these edits cannot be saved to it. They stay on this device; add them as an addendum.' };
  if (status === 403) return { kind: 'stop', reason: 'forbidden', message: 'Your role may not change this study. Your edits were not saved.' };
  if (status === 404) return { kind: 'stop', reason: 'gone', message: 'This study no longer exists.' };
  if (isTransient(status)) return { kind: 'retry' };
  return { kind: 'stop', reason: 'refused', message: `${problem?.detail ?? 'The change was refused.'} Reload the study.` };
}

/** No answer (0), a timeout, too many requests, or a server fault: worth sending again. */
const isTransient = (status: number) => status === 0 || status === 408 || status === 429 || status >= 500;

/** Sends of one save before autosave stops trying on its own (about 40 s with the delays below). */
export const maxSaveRetries = 8;

/**
 * Autosave tries again while the failure is transient, a bounded number of times: the edits are safe on
 * the device meanwhile, and after that the next edit, the connection coming back or "Try now" sends them.
 * Retrying for ever would hammer a failing server and keep the page busy with no end in sight.
 */
export function shouldRetrySave(failureCount: number, failure: SaveFailure): boolean {
  return isTransient(failure.status) && failureCount < maxSaveRetries;
}

/** 1 s, 2 s, 4 s, then every 5 s (`failureCount` counts failures so far, from 0). */
export const saveRetryDelay = (failureCount: number) => Math.min(1000 * 2 ** failureCount, 5000);
