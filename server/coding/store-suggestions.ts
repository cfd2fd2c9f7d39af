import { z } from 'zod';
import { CODING_CAUTION, suggestCodes, toCodingInput, emptyStudyCoding, type CodingInput, type CodingResult } from '../../shared/coding';
import { inputChanges } from '../../shared/coding/review';
import type { PhysiologyResult } from '../../shared/physiology/types';
import type { StudySections } from '../../shared/study/schema';
import { recordAudit } from '../audit/audit';
import { labSettings } from '../settings/lab-settings';
import { auditTarget, type Sql } from './sql';
import { lockStudy } from '../studies/lock-study';

export interface StoredSuggestions {
  setId: string;
  /** False when the version already had its suggestions (a repeated job). */
  created: boolean;
  /** The study is (back) on the coding queue with this set. */
  queued: boolean;
  codes: number;
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
 * Makes and stores the code suggestions of one signed report version, and puts the study on the
 * coding queue. Run inside a transaction. Repeating it for the same version changes nothing.
 *
 * An addendum's version gets its own set, compared later with the codes decided for the previous
 * one. If what coding depends on (the engine's input) is unchanged, the review in progress (or
 * completed) stays as it is; otherwise the new set takes over and the study goes back to "to code".
 */
export async function storeSuggestions(sql: Sql, reportVersionId: string, known: { timeZone?: string } = {}): Promise<StoredSuggestions> {
  const [version] = await sql(
    `SELECT id, study_id, version_no, snapshot, analysis, signed_at FROM report_version WHERE id = $1`,
    [reportVersionId],
  );
  if (!version) throw new Error(`No report version ${reportVersionId}`);
  // One writer per study at a time: concurrent jobs for two versions of a study queue here.
  await lockStudy({ query: sql }, version.study_id);

  const [existing] = await sql(`SELECT id FROM code_suggestion_set WHERE report_version_id = $1`, [reportVersionId]);
  if (existing) return { setId: existing.id, created: false, queued: false, codes: 0 };

  const timeZone = known.timeZone ?? (await labSettings(auditTarget(sql))).timeZone;
  const { input, result, failure } = suggestFromSnapshot(version.snapshot, version.analysis, timeZone);
  const [previous] = await sql(
    `SELECT id, input FROM code_suggestion_set WHERE study_id = $1 AND version_no < $2 ORDER BY version_no DESC LIMIT 1`,
    [version.study_id, version.version_no],
  );
  const failureWarning = failure ? [{ code: 'suggestions-failed', message: failure }] : [];
  const [set] = await sql(
    `INSERT INTO code_suggestion_set (report_version_id, study_id, version_no, previous_set_id, input, warnings, code_sets, caution, failure)
     VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9) RETURNING id`,
    [
      reportVersionId,
      version.study_id,
      version.version_no,
      previous?.id ?? null,
      input ? JSON.stringify(input) : null,
      JSON.stringify([...(result?.warnings ?? []), ...failureWarning]),
      result ? JSON.stringify(result.codeSets) : null,
      result?.caution ?? CODING_CAUTION,
      failure,
    ],
  );
  const codes = result?.codes ?? [];
  if (codes.length > 0) {
    // Every line in one statement: signing waits on this inside its transaction.
    await sql(
      `INSERT INTO code_line (set_id, position, origin, system, code, units, modifiers, rule_id, rationale, description, add_on, code_set, source)
       SELECT $1, l.position, 'suggested', l.system, l.code, l.units, ARRAY(SELECT m FROM jsonb_array_elements_text(l.modifiers) WITH ORDINALITY AS x(m, n) ORDER BY n), l.rule_id, l.rationale, l.description, l.add_on, l.code_set, l.source
       FROM jsonb_to_recordset($2::jsonb) AS l(position int, system text, code text, units int, modifiers jsonb, rule_id text, rationale text, description text, add_on boolean, code_set text, source text)`,
      [
        set.id,
        JSON.stringify(
          codes.map((c, position) => ({ position, system: c.system, code: c.code, units: c.units, modifiers: c.modifiers, rule_id: c.ruleId, rationale: c.rationale, description: c.description, add_on: c.addOn, code_set: c.codeSet, source: c.source })),
        ),
      ],
    );
  }

  const [review] = await sql(
    `SELECT r.status, s.version_no, s.input FROM coding_review r JOIN code_suggestion_set s ON s.id = r.current_set_id WHERE r.study_id = $1 FOR UPDATE OF r`,
    [version.study_id],
  );
  let queued = false;
  if (!review) {
    await sql(`INSERT INTO coding_review (study_id, status, current_set_id, queued_at) VALUES ($1, 'to-code', $2, $3)`, [version.study_id, set.id, version.signed_at]);
    queued = true;
  } else if (review.version_no < version.version_no && (failure || inputChanges(review.input, input as Record<string, unknown> | null).length > 0)) {
    await sql(
      `UPDATE coding_review SET status = 'to-code', current_set_id = $2, queued_at = $3, completed_by = NULL, completer_name = NULL, completed_at = NULL, updated_at = now()
       WHERE study_id = $1`,
      [version.study_id, set.id, version.signed_at],
    );
    queued = true;
  }

  await recordAudit(auditTarget(sql), {
    actorName: 'Isobar',
    actorRole: 'system',
    action: 'create',
    entityType: 'code-suggestions',
    entityId: version.study_id,
    outcome: failure ? 'failure' : 'success',
    detail: { reportVersionId, versionNo: version.version_no, setId: set.id, codes: codes.length, queued, ...(failure ? { failure } : {}) },
  });
  return { setId: set.id, created: true, queued, codes: codes.length };
}
