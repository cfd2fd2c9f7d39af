import { stringify } from 'csv-stringify/sync';
import { csvExportOptions } from '../../../shared/csv/neutralise';
import type { Decision } from '../../../shared/coding/review';
import { loadLines } from './review';
import { auditTarget, type Sql } from '../sql';
import { labSettings } from '../../settings/lab-settings';
import { localMidnight } from '../../db/local-midnight';

export interface ExportedCode {
  accession: string;
  mrn: string;
  patient: string;
  dateOfService: string | null;
  reportVersion: number;
  system: string;
  code: string;
  modifiers: string[];
  units: number;
  description: string | null;
  ruleId: string | null;
  decision: Decision;
  reason: string | null;
  codedBy: string;
  codedAt: string;
}

/**
 * The reviewed codes of the studies coded (review completed) between two days, inclusive: one row
 * per code as it is reported — accepted, edited (the edit), added; rejected codes are not codes.
 */
export async function exportCodes(sql: Sql, from: string, to: string): Promise<ExportedCode[]> {
  // Days are the lab's calendar days, not the database server's; the date of service is the one the
  // codes were suggested for (the signed record's, in the lab's zone).
  const { timeZone } = await labSettings(auditTarget(sql));
  const reviews = await sql(
    `SELECT r.current_set_id, r.completer_name, r.completed_at, cs.version_no, s.accession, p.mrn, p.family_name, p.given_name,
            coalesce(cs.input->>'dateOfService', to_char(s.procedure_started_at AT TIME ZONE $3, 'YYYY-MM-DD')) AS date_of_service
     FROM coding_review r
     JOIN code_suggestion_set cs ON cs.id = r.current_set_id
     JOIN study s ON s.id = r.study_id
     JOIN patient p ON p.id = s.patient_id
     WHERE r.status = 'coded' AND r.completed_at >= ${localMidnight('$1::date')} AND r.completed_at < ${localMidnight('$2::date + 1')}
     ORDER BY r.completed_at, r.study_id`,
    [from, to, timeZone],
  );
  const out: ExportedCode[] = [];
  for (const r of reviews) {
    for (const l of await loadLines(sql, r.current_set_id)) {
      if (!l.final || !l.decision) continue;
      out.push({
        accession: r.accession,
        mrn: r.mrn,
        patient: `${r.family_name}, ${r.given_name}`,
        dateOfService: r.date_of_service,
        reportVersion: r.version_no,
        system: l.final.system,
        code: l.final.code,
        modifiers: l.final.modifiers,
        units: l.final.units,
        description: l.decision.decision === 'edit' && l.final.code !== l.code ? null : l.description,
        ruleId: l.ruleId,
        decision: l.decision.decision,
        reason: l.decision.reason,
        codedBy: r.completer_name,
        codedAt: (r.completed_at as Date).toISOString(),
      });
    }
  }
  return out;
}

const columns: [keyof ExportedCode, string][] = [
  ['accession', 'accession'],
  ['mrn', 'mrn'],
  ['patient', 'patient'],
  ['dateOfService', 'date_of_service'],
  ['reportVersion', 'report_version'],
  ['system', 'system'],
  ['code', 'code'],
  ['modifiers', 'modifiers'],
  ['units', 'units'],
  ['description', 'description'],
  ['ruleId', 'rule_id'],
  ['decision', 'decision'],
  ['reason', 'reason'],
  ['codedBy', 'coded_by'],
  ['codedAt', 'coded_at'],
];

/** CSV through csv-stringify; every text cell goes through the product's one CSV neutraliser. */
export function codesToCsv(rows: ExportedCode[]): string {
  return stringify(
    rows.map((r) => columns.map(([k]) => (k === 'modifiers' ? r.modifiers.join(' ') : (r[k] ?? '')))),
    {
      header: true,
      columns: columns.map(([, header]) => header),
      ...csvExportOptions,
      cast: { ...csvExportOptions.cast, number: (value: number) => String(value) },
    },
  );
}
