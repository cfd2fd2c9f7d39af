import { stringify } from 'csv-stringify/sync';
import type { EntityManager } from 'typeorm';
import { csvExportOptions } from '../../../shared/csv/neutralise';
import type { Decision } from '../../../shared/coding/review';
import { loadLines } from './review';
import { labSettings } from '../../settings/queries/lab-settings';
import { localMidnight } from '../../db/local-midnight';
import { CodingReview } from '../../db/entities/coding.entities';

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
export async function listReviewedCodes(manager: EntityManager, from: string, to: string): Promise<ExportedCode[]> {
  // Days are the lab's calendar days, not the database server's; the date of service is the one the
  // codes were suggested for (the signed record's, in the lab's zone).
  const { timeZone } = await labSettings(manager);
  // localMidnight's SQL names the zone as $3; here it is the named parameter.
  const midnight = (date: string) => localMidnight(date).replaceAll('$3', ':timeZone');
  const { entities: reviews, raw } = await manager
    .createQueryBuilder(CodingReview, 'r')
    .innerJoin('r.currentSet', 'cs')
    .innerJoin('r.study', 's')
    .innerJoin('s.patient', 'p')
    .select(['r.studyId', 'r.currentSetId', 'r.completerName', 'r.completedAt', 'cs.id', 'cs.versionNo', 's.id', 's.accession', 'p.id', 'p.mrn', 'p.familyName', 'p.givenName'])
    .addSelect(`coalesce(cs.input ->> 'dateOfService', to_char(s.procedureStartedAt AT TIME ZONE :timeZone, 'YYYY-MM-DD'))`, 'date_of_service')
    .where(`r.status = 'coded' AND r.completedAt >= ${midnight('CAST(:from AS date)')} AND r.completedAt < ${midnight('CAST(:to AS date) + 1')}`, { from, to, timeZone })
    .orderBy('r.completedAt')
    .addOrderBy('r.studyId')
    .getRawAndEntities<{ date_of_service: string | null }>();
  const out: ExportedCode[] = [];
  for (const [i, r] of reviews.entries()) {
    const study = r.study!;
    for (const l of await loadLines(manager, r.currentSetId)) {
      if (!l.final || !l.decision) continue;
      out.push({
        accession: study.accession,
        mrn: study.patient!.mrn,
        patient: `${study.patient!.familyName}, ${study.patient!.givenName}`,
        dateOfService: raw[i].date_of_service,
        reportVersion: r.currentSet!.versionNo,
        system: l.final.system,
        code: l.final.code,
        modifiers: l.final.modifiers,
        units: l.final.units,
        description: l.decision.decision === 'edit' && l.final.code !== l.code ? null : l.description,
        ruleId: l.ruleId,
        decision: l.decision.decision,
        reason: l.decision.reason,
        // A coded review always names who completed it and when.
        codedBy: r.completerName!,
        codedAt: r.completedAt!.toISOString(),
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
