import { z } from 'zod';
import { checkCodeLine } from './format';
import { codeSystems, type CodeSystem, type CodingWarning, type CodeSetChoice } from './schema';

/**
 * The coder's review of a set of suggestions: the request bodies (shared by the form and the API),
 * the view the API returns, and the comparison of a new set with the codes decided for the previous
 * report version. Pure: no React, Express or TypeORM.
 */

const reviewStatuses = ['to-code', 'in-review', 'coded'] as const;
export type ReviewStatus = (typeof reviewStatuses)[number];
export const reviewStatusLabel: Record<ReviewStatus, string> = { 'to-code': 'To code', 'in-review': 'In review', coded: 'Coded' };

const reason = (what: string) =>
  z
    .string({ error: `${what}: say why.` })
    .trim()
    .min(3, { error: `${what}: say why (at least a few words).` })
    .max(1000, { error: `${what}: at most 1000 characters.` });

const codeText = z.string({ error: 'Code is required.' }).trim().toUpperCase().min(1, { error: 'Code is required.' }).max(20, { error: 'Code is too long.' });
const modifierList = z
  .array(z.string({ error: 'A modifier is text.' }).trim().toUpperCase(), { error: 'Modifiers must be a list.' })
  .max(8, { error: 'Too many modifiers.' });
const unitCount = z.number({ error: 'Units must be a number.' });

/** A code line as a coder types it: checked against its system's format, each problem at its field. */
const checkedLine = (line: { system: CodeSystem; code: string; units: number; modifiers: string[] }, ctx: z.RefinementCtx) => {
  for (const p of checkCodeLine(line)) ctx.addIssue({ code: 'custom', path: [p.field], message: p.message });
};

const lineId = z.uuid({ error: 'lineId must be the id of a code line.' });
/** The set the coder was looking at: a decision on an older set (an addendum came in) is refused. */
const setId = z.uuid({ error: 'setId must be the id of the suggestion set.' });

export const decideCodeSchema = z.discriminatedUnion(
  'decision',
  [
    z.object({ decision: z.literal('accept'), setId, lineId }),
    z.object({ decision: z.literal('reject'), setId, lineId, reason: reason('Rejecting a code') }),
    /** The system stays the suggestion's: the server checks the format against it. */
    z.object({ decision: z.literal('edit'), setId, lineId, code: codeText, units: unitCount, modifiers: modifierList, reason: reason('Editing a code') }),
  ],
  { error: 'decision: accept, edit or reject.' },
);
export type DecideCode = z.infer<typeof decideCodeSchema>;

export const addCodeSchema = z
  .object({
    setId,
    system: z.enum(codeSystems, { error: `System: one of ${codeSystems.join(', ')}.` }),
    code: codeText,
    units: unitCount,
    modifiers: modifierList,
    reason: reason('Adding a code'),
  })
  .superRefine(checkedLine);
export type AddCode = z.infer<typeof addCodeSchema>;

export const completeReviewSchema = z.object({ setId });

export const codingQueueQuerySchema = z.object({
  operatorId: z.uuid({ error: 'operatorId must be a physician id.' }).optional(),
  /** Signed on or after this day (YYYY-MM-DD). */
  from: z.iso.date({ error: 'from must be a date (YYYY-MM-DD).' }).optional(),
  /** Signed on or before this day. */
  to: z.iso.date({ error: 'to must be a date (YYYY-MM-DD).' }).optional(),
  status: z.enum(['open', ...reviewStatuses], { error: 'status: open, to-code, in-review or coded.' }).default('open'),
});
export type CodingQueueQuery = z.infer<typeof codingQueueQuerySchema>;

export const codeExportQuerySchema = z
  .object({
    from: z.iso.date({ error: 'from must be a date (YYYY-MM-DD).' }),
    to: z.iso.date({ error: 'to must be a date (YYYY-MM-DD).' }),
    format: z.enum(['csv', 'json'], { error: 'format: csv or json.' }).default('csv'),
  })
  .refine((q) => q.from <= q.to, { path: ['to'], error: 'to must be on or after from.' });

/** A code as billed: what a decision settles a line to. */
export interface FinalCode {
  system: CodeSystem;
  code: string;
  units: number;
  modifiers: string[];
}

export type Decision = 'accept' | 'edit' | 'reject' | 'add';

export interface ReviewLine {
  id: string;
  origin: 'suggested' | 'added';
  /** The line as the engine suggested it (or the coder added it); never changed. */
  system: CodeSystem;
  code: string;
  units: number;
  modifiers: string[];
  ruleId: string | null;
  rationale: string | null;
  description: string | null;
  addOn: boolean;
  codeSet: string | null;
  source: string | null;
  /** The newest decision on the line, or null while it waits for one. */
  decision: null | {
    decision: Decision;
    reason: string | null;
    by: string;
    at: string;
  };
  /** The code as it will be reported: null while undecided or when rejected. */
  final: FinalCode | null;
}

/** How a new set's codes compare with the codes decided for the previous report version. */
export interface CodeChange {
  kind: 'new' | 'changed' | 'unchanged' | 'dropped';
  system: CodeSystem;
  code: string;
  /** The previous version's decided code (absent for a new one). */
  before?: FinalCode;
  /** This version's suggestion (absent for a dropped one). */
  after?: FinalCode;
}

export interface ReviewView {
  study: {
    id: string;
    accession: string;
    state: string;
    patient: { mrn: string; familyName: string; givenName: string; birthDate: string };
    operatorName: string | null;
    procedureStartedAt: string | null;
  };
  status: ReviewStatus;
  completedBy: string | null;
  completedAt: string | null;
  set: {
    id: string;
    versionNo: number;
    createdAt: string;
    warnings: CodingWarning[];
    codeSets: null | Record<string, unknown> & { CPT?: CodeSetChoice };
    caution: string;
    failure: string | null;
  };
  report: { versionNo: number; status: string; signedAt: string; signerName: string; narrativeText: string; reason: string | null };
  lines: ReviewLine[];
  /** Against the previous report version's decided codes; null for a first version. */
  changes: null | { previousVersionNo: number; inputChanges: string[]; codes: CodeChange[] };
  /** Why the review cannot be completed yet (empty when it can). */
  blockers: string[];
}

export interface QueueItem {
  studyId: string;
  accession: string;
  patient: { mrn: string; familyName: string; givenName: string; birthDate: string };
  operatorName: string | null;
  status: ReviewStatus;
  versionNo: number;
  /** When the set in force was made (the report signed or amended). */
  queuedAt: string;
  hoursWaiting: number;
  codeCount: number;
  blockingWarnings: number;
}

const keyOf = (c: { system: string; code: string }) => `${c.system}|${c.code}`;
const sameBilling = (a: FinalCode, b: FinalCode) => a.units === b.units && [...a.modifiers].sort().join(',') === [...b.modifiers].sort().join(',');

/**
 * The new set's suggestions against the codes decided for the previous version (accepted, edited
 * or added — rejected ones are not codes). One entry per system and code; a code present in both
 * with other units or modifiers is "changed".
 */
export function compareCodes(previous: FinalCode[], next: FinalCode[]): CodeChange[] {
  const before = new Map(previous.map((c) => [keyOf(c), c]));
  const after = new Map(next.map((c) => [keyOf(c), c]));
  const out: CodeChange[] = [];
  for (const [k, a] of after) {
    const b = before.get(k);
    if (!b) out.push({ kind: 'new', system: a.system, code: a.code, after: a });
    else out.push({ kind: sameBilling(a, b) ? 'unchanged' : 'changed', system: a.system, code: a.code, before: b, after: a });
  }
  for (const [k, b] of before) if (!after.has(k)) out.push({ kind: 'dropped', system: b.system, code: b.code, before: b });
  const order = { new: 0, changed: 1, dropped: 2, unchanged: 3 };
  return out.sort((x, y) => order[x.kind] - order[y.kind]);
}

const inputLabels: Record<string, string> = {
  billing: 'billing context',
  setting: 'setting',
  patientClass: 'patient class',
  cath: 'diagnostic catheterization',
  pci: 'interventions',
  physiology: 'physiology measured per vessel',
  vasoreactivity: 'provocation testing',
  diagnoses: 'diagnoses from the findings',
  dateOfService: 'date of service',
};

const stable = (v: unknown): string =>
  v === null || typeof v !== 'object'
    ? JSON.stringify(v ?? null)
    : Array.isArray(v)
      ? `[${v.map(stable).join(',')}]`
      : `{${Object.keys(v as object)
          .sort()
          .map((k) => `${JSON.stringify(k)}:${stable((v as Record<string, unknown>)[k])}`)
          .join(',')}}`;

/** Which facts the codes depend on differ between two coding inputs (the mapping's notes aside). */
export function inputChanges(previous: Record<string, unknown> | null, next: Record<string, unknown> | null): string[] {
  if (!previous || !next) return previous === next ? [] : ['the whole record (one version could not be read for coding)'];
  return Object.keys(inputLabels).filter((k) => stable(previous[k]) !== stable(next[k])).map((k) => inputLabels[k]);
}
