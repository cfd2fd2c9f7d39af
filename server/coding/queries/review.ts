import type { CodeSystem, CodingWarning } from '../../../shared/coding';
import { compareCodes, inputChanges, type Decision, type FinalCode, type ReviewLine, type ReviewStatus, type ReviewView } from '../../../shared/coding/review';
import { RecordNotFoundError } from '../../errors';
import type { Sql } from '../sql';

type LineRow = {
  id: string;
  origin: 'suggested' | 'added';
  system: CodeSystem;
  code: string;
  units: number;
  modifiers: string[];
  rule_id: string | null;
  rationale: string | null;
  description: string | null;
  add_on: boolean;
  code_set: string | null;
  source: string | null;
  decision: Decision | null;
  d_code: string | null;
  d_units: number | null;
  d_modifiers: string[] | null;
  reason: string | null;
  decider_name: string | null;
  decided_at: Date | null;
};

/** A set's lines, each with its newest decision and the code it settles to. */
export async function loadLines(sql: Sql, setId: string): Promise<ReviewLine[]> {
  const rows: LineRow[] = await sql(
    `SELECT l.id, l.origin, l.system, l.code, l.units, l.modifiers, l.rule_id, l.rationale, l.description, l.add_on, l.code_set, l.source,
            d.decision, d.code AS d_code, d.units AS d_units, d.modifiers AS d_modifiers, d.reason, d.decider_name, d.decided_at
     FROM code_line l
     LEFT JOIN LATERAL (SELECT * FROM code_decision cd WHERE cd.line_id = l.id ORDER BY cd.id DESC LIMIT 1) d ON true
     WHERE l.set_id = $1 ORDER BY l.position`,
    [setId],
  );
  return rows.map((r) => {
    const original: FinalCode = { system: r.system, code: r.code, units: r.units, modifiers: r.modifiers };
    let final: FinalCode | null = null;
    if (r.decision === 'accept' || r.decision === 'add') final = original;
    else if (r.decision === 'edit') final = { system: r.system, code: r.d_code!, units: r.d_units!, modifiers: r.d_modifiers! };
    return {
      id: r.id,
      origin: r.origin,
      ...original,
      ruleId: r.rule_id,
      rationale: r.rationale,
      description: r.description,
      addOn: r.add_on,
      codeSet: r.code_set,
      source: r.source,
      decision: r.decision ? { decision: r.decision, reason: r.reason, by: r.decider_name!, at: r.decided_at!.toISOString() } : null,
      final,
    };
  });
}

/** Why the review cannot be completed yet: blocking warnings and lines without a decision. */
function blockersOf(warnings: CodingWarning[], lines: ReviewLine[]): string[] {
  const out = warnings.filter((w) => w.blocking).map((w) => w.message);
  const undecided = lines.filter((l) => !l.decision).length;
  if (undecided) out.push(`${undecided} suggested code${undecided === 1 ? ' has' : 's have'} no decision yet: accept, edit or reject each.`);
  return out;
}

/** A study's code review: the set in force, its lines and decisions, the signed report, what changed. */
export async function loadReview(sql: Sql, studyId: string): Promise<ReviewView> {
  const [row] = await sql(
    `SELECT r.status, r.completer_name, r.completed_at,
            cs.id AS set_id, cs.version_no, cs.created_at AS set_created_at, cs.warnings, cs.code_sets, cs.caution, cs.failure, cs.input, cs.previous_set_id,
            rv.version_no AS report_version_no, rv.status AS report_status, rv.signed_at, rv.signer_name, rv.narrative_text, rv.reason AS report_reason,
            s.id AS study_id, s.accession, s.state, s.procedure_started_at,
            p.mrn, p.family_name, p.given_name, to_char(p.birth_date, 'YYYY-MM-DD') AS birth_date, u.display_name AS operator_name
     FROM coding_review r
     JOIN code_suggestion_set cs ON cs.id = r.current_set_id
     JOIN report_version rv ON rv.id = cs.report_version_id
     JOIN study s ON s.id = r.study_id
     JOIN patient p ON p.id = s.patient_id
     LEFT JOIN app_user u ON u.id = s.operator_id
     WHERE r.study_id = $1`,
    [studyId],
  );
  if (!row) {
    const [study] = await sql(`SELECT state FROM study WHERE id = $1`, [studyId]);
    throw new RecordNotFoundError(study ? 'This study has no code suggestions yet: they are made when its report is signed.' : 'No study has this id.');
  }
  const lines = await loadLines(sql, row.set_id);
  const warnings = row.warnings as CodingWarning[];

  let changes: ReviewView['changes'] = null;
  if (row.previous_set_id) {
    const [previous] = await sql(`SELECT version_no, input FROM code_suggestion_set WHERE id = $1`, [row.previous_set_id]);
    const previousFinal = (await loadLines(sql, row.previous_set_id)).flatMap((l) => (l.final ? [l.final] : []));
    const suggested = lines.filter((l) => l.origin === 'suggested').map(({ system, code, units, modifiers }) => ({ system, code, units, modifiers }));
    changes = { previousVersionNo: previous.version_no, inputChanges: inputChanges(previous.input, row.input), codes: compareCodes(previousFinal, suggested) };
  }

  return {
    study: {
      id: row.study_id,
      accession: row.accession,
      state: row.state,
      patient: { mrn: row.mrn, familyName: row.family_name, givenName: row.given_name, birthDate: row.birth_date },
      operatorName: row.operator_name,
      procedureStartedAt: row.procedure_started_at?.toISOString() ?? null,
    },
    status: row.status as ReviewStatus,
    completedBy: row.completer_name,
    completedAt: row.completed_at?.toISOString() ?? null,
    set: {
      id: row.set_id,
      versionNo: row.version_no,
      createdAt: row.set_created_at.toISOString(),
      warnings,
      codeSets: row.code_sets,
      caution: row.caution,
      failure: row.failure,
    },
    report: {
      versionNo: row.report_version_no,
      status: row.report_status,
      signedAt: row.signed_at.toISOString(),
      signerName: row.signer_name,
      narrativeText: row.narrative_text,
      reason: row.report_reason,
    },
    lines,
    changes,
    blockers: row.status === 'coded' ? [] : blockersOf(warnings, lines),
  };
}
