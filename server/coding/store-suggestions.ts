import { z } from 'zod';
import { CODING_CAUTION, suggestCodes, toCodingInput, emptyStudyCoding, type CodingInput, type CodingResult } from '../../shared/coding';
import { inputChanges } from '../../shared/coding/review';
import type { PhysiologyResult } from '../../shared/physiology/types';
import type { StudySections } from '../../shared/study/schema';
import { randomUUID } from 'node:crypto';
import type { EntityManager } from 'typeorm';
import { auditColumns, auditParameters, type AuditEntry } from '../audit/audit';
import { labSettings } from '../settings/queries/lab-settings';
import { lockStudy } from '../studies/lock-study';

export interface StoredSuggestions {
  setId: string;
  /** False when the version already had its suggestions (a repeated job). */
  created: boolean;
  /** The study is (back) on the coding queue with this set. */
  queued: boolean;
  codes: number;
}

/** A signed version as coding reads it. */
export interface SignedVersionForCoding {
  id: string;
  studyId: string;
  versionNo: number;
  snapshot: unknown;
  analysis: unknown;
  signedAt: Date;
}

/** The study's coding before this version: its newest suggestion set and its review (locked by the reader). */
export interface CodingBefore {
  previousSetId: string | null;
  review: { status: string; versionNo: number; input: Record<string, unknown> | null } | null;
}

/** The rows one version's suggestions add: the set, its lines, what happens to the review, the audit entry. */
export interface PlannedSuggestions {
  setId: string;
  studyId: string;
  versionNo: number;
  signedAt: Date;
  set: { reportVersionId: string; previousSetId: string | null; input: CodingInput | null; warnings: unknown[]; codeSets: unknown; caution: string; failure: string | null };
  lines: Array<Record<string, unknown>>;
  /** `queue`: first review of the study; `requeue`: back to "to code" with this set; `keep`: the review in progress stays. */
  review: 'queue' | 'requeue' | 'keep';
  audit: AuditEntry;
}

/** A version signed before the study recorded its coding section reads as "nothing recorded yet". */
const snapshotSchema = z.looseObject({
  details: z.looseObject({}),
  setup: z.looseObject({}),
  vessels: z.array(z.looseObject({})),
  vasoreactivity: z.looseObject({ doses: z.array(z.looseObject({})) }),
  coding: z.unknown().optional(),
});

/** The engine on a signed record: its input and result, or why it could not run. */
function suggestFromSnapshot(snapshot: unknown, analysis: unknown, timeZone = 'UTC'): { input: CodingInput | null; result: CodingResult | null; failure: string | null } {
  try {
    const record = snapshotSchema.parse(snapshot) as unknown as StudySections;
    const input = toCodingInput({ ...record, coding: record.coding ?? emptyStudyCoding() }, analysis as PhysiologyResult, { timeZone });
    return { input, result: suggestCodes(input), failure: null };
  } catch (error) {
    const detail = error instanceof z.ZodError ? error.issues.slice(0, 5).map((i) => `${i.path.join('.') || 'record'}: ${i.message}`).join('; ') : String((error as Error)?.message ?? error);
    return { input: null, result: null, failure: `The signed record could not be read for coding (${detail}). Code this study by hand.` };
  }
}

/**
 * The suggestions of one signed version and what they change, decided before anything is written.
 * An addendum's version gets its own set, compared with the set the review is on: if what coding
 * depends on (the engine's input) is unchanged, the review in progress (or completed) stays as it
 * is; otherwise the new set takes over and the study goes back to "to code".
 */
export function planSuggestions(version: SignedVersionForCoding, before: CodingBefore, timeZone: string): PlannedSuggestions {
  const { input, result, failure } = suggestFromSnapshot(version.snapshot, version.analysis, timeZone);
  const setId = randomUUID();
  const codes = result?.codes ?? [];
  const { review } = before;
  const changed = review !== null && review.versionNo < version.versionNo && (failure !== null || inputChanges(review.input, input as Record<string, unknown> | null).length > 0);
  const reviewAction = review === null ? 'queue' : changed ? 'requeue' : 'keep';
  return {
    setId,
    studyId: version.studyId,
    versionNo: version.versionNo,
    signedAt: version.signedAt,
    set: {
      reportVersionId: version.id,
      previousSetId: before.previousSetId,
      input,
      warnings: [...(result?.warnings ?? []), ...(failure ? [{ code: 'suggestions-failed', message: failure }] : [])],
      codeSets: result?.codeSets ?? null,
      caution: result?.caution ?? CODING_CAUTION,
      failure,
    },
    lines: codes.map((c, position) => ({ position, system: c.system, code: c.code, units: c.units, modifiers: c.modifiers, rule_id: c.ruleId, rationale: c.rationale, description: c.description, add_on: c.addOn, code_set: c.codeSet, source: c.source })),
    review: reviewAction,
    audit: {
      actorName: 'Isobar',
      actorRole: 'system',
      action: 'create',
      entityType: 'code-suggestions',
      entityId: version.studyId,
      outcome: failure ? 'failure' : 'success',
      detail: { reportVersionId: version.id, versionNo: version.versionNo, setId, codes: codes.length, queued: reviewAction !== 'keep', ...(failure ? { failure } : {}) },
    },
  };
}

/**
 * The planned rows as common table expressions of one statement (`p` adds a parameter and answers its
 * placeholder): the set, its lines and the review. The caller writes `plan.audit` with its own audit rows.
 */
export function suggestionWrites(plan: PlannedSuggestions, p: (value: unknown, cast?: string) => string): string[] {
  const set = plan.set;
  const setId = p(plan.setId, '::uuid');
  const writes = [
    `coding_set AS (
       INSERT INTO code_suggestion_set (id, report_version_id, study_id, version_no, previous_set_id, input, warnings, code_sets, caution, failure)
       VALUES (${setId}, ${p(set.reportVersionId, '::uuid')}, ${p(plan.studyId, '::uuid')}, ${p(plan.versionNo, '::int')}, ${p(set.previousSetId, '::uuid')},
               ${p(set.input ? JSON.stringify(set.input) : null, '::jsonb')}, ${p(JSON.stringify(set.warnings), '::jsonb')},
               ${p(set.codeSets ? JSON.stringify(set.codeSets) : null, '::jsonb')}, ${p(set.caution)}, ${p(set.failure)}))`,
  ];
  if (plan.lines.length > 0) {
    writes.push(`coding_lines AS (
       INSERT INTO code_line (set_id, position, origin, system, code, units, modifiers, rule_id, rationale, description, add_on, code_set, source)
       SELECT ${setId}, l.position, 'suggested', l.system, l.code, l.units, ARRAY(SELECT m FROM jsonb_array_elements_text(l.modifiers) WITH ORDINALITY AS x(m, n) ORDER BY n),
              l.rule_id, l.rationale, l.description, l.add_on, l.code_set, l.source
       FROM jsonb_to_recordset(${p(JSON.stringify(plan.lines), '::jsonb')}) AS l(position int, system text, code text, units int, modifiers jsonb, rule_id text, rationale text, description text, add_on boolean, code_set text, source text))`);
  }
  // Only the parameters a statement uses: PostgreSQL cannot type one it never sees.
  const studyId = () => p(plan.studyId, '::uuid');
  const queuedAt = () => p(plan.signedAt, '::timestamptz');
  if (plan.review === 'queue') {
    writes.push(`coding_queue AS (INSERT INTO coding_review (study_id, status, current_set_id, queued_at) VALUES (${studyId()}, 'to-code', ${setId}, ${queuedAt()}))`);
  } else if (plan.review === 'requeue') {
    writes.push(`coding_queue AS (
       UPDATE coding_review SET status = 'to-code', current_set_id = ${setId}, queued_at = ${queuedAt()}, completed_by = NULL, completer_name = NULL, completed_at = NULL, updated_at = now()
       WHERE study_id = ${studyId()})`);
  }
  return writes;
}

/**
 * The select list that reads a study's coding before a new version (its newest set below that
 * version, and its review with the review's set), with `codingBeforeJoin`; the review row is locked.
 */
export const codingBeforeSql = (studyIdParam: string, versionNoParam: string) => `
  (SELECT id FROM code_suggestion_set WHERE study_id = ${studyIdParam} AND version_no < ${versionNoParam} ORDER BY version_no DESC LIMIT 1) AS coding_prev_set_id,
  rev.status AS coding_review_status, rev.version_no AS coding_review_version_no, rev.input AS coding_review_input`;
export const codingBeforeJoin = (studyIdParam: string) => `
  LEFT JOIN LATERAL (SELECT r.status, s.version_no, s.input FROM coding_review r JOIN code_suggestion_set s ON s.id = r.current_set_id WHERE r.study_id = ${studyIdParam} FOR UPDATE OF r) rev ON true`;
// eslint-disable-next-line @typescript-eslint/no-explicit-any
export const codingBeforeOf = (row: any): CodingBefore => ({
  previousSetId: row.coding_prev_set_id ?? null,
  review: row.coding_review_status == null ? null : { status: row.coding_review_status, versionNo: row.coding_review_version_no, input: row.coding_review_input ?? null },
});

/**
 * Makes and stores the code suggestions of one signed report version, and puts the study on the
 * coding queue, in one statement. Run inside a transaction. Repeating it for the same version
 * changes nothing. (A signature does the same inside its own statement: see sign-study.ts.)
 */
export async function storeSuggestions(manager: EntityManager, reportVersionId: string, known: { timeZone?: string } = {}): Promise<StoredSuggestions> {
  const [version] = await manager.query(
    `SELECT id, study_id, version_no, snapshot, analysis, signed_at FROM report_version WHERE id = $1`,
    [reportVersionId],
  );
  if (!version) throw new Error(`No report version ${reportVersionId}`);
  // One writer per study at a time: concurrent jobs for two versions of a study queue here.
  await lockStudy(manager, version.study_id);

  const [existing] = await manager.query(`SELECT id FROM code_suggestion_set WHERE report_version_id = $1`, [reportVersionId]);
  if (existing) return { setId: existing.id, created: false, queued: false, codes: 0 };

  const timeZone = known.timeZone ?? (await labSettings(manager)).timeZone;
  const [beforeRow] = await manager.query(`SELECT ${codingBeforeSql('$1::uuid', '$2::int')} FROM (SELECT 1) AS one ${codingBeforeJoin('$1::uuid')}`, [version.study_id, version.version_no]);
  const plan = planSuggestions(
    { id: version.id, studyId: version.study_id, versionNo: version.version_no, snapshot: version.snapshot, analysis: version.analysis, signedAt: version.signed_at },
    codingBeforeOf(beforeRow),
    timeZone,
  );
  const params: unknown[] = [];
  const p = (value: unknown, cast = '') => `$${params.push(value)}${cast}`;
  const writes = suggestionWrites(plan, p);
  await manager.query(`WITH ${writes.join(',\n')} INSERT INTO audit_event (${auditColumns}) VALUES (${auditParameters(plan.audit).map((x) => p(x)).join(', ')})`, params);
  return { setId: plan.setId, created: true, queued: plan.review !== 'keep', codes: plan.lines.length };
}
