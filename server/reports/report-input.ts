import type { EntityManager } from 'typeorm';
import { analyzeStudy } from '../../shared/physiology';
import type { StudyRecord } from '../../shared/study/schema';
import { toPhysiologyInput } from '../../shared/study/to-physiology';
import type { ReportInput, ReportStudy } from '../report';
import { thresholdsInForce } from '../settings/thresholds';

/** The parts of a study record a report is built from (and that a signed version keeps). */
export function reportStudyOf(record: StudyRecord): ReportStudy {
  const { id, accession, patient, details, setup, vessels, vasoreactivity, findings } = record;
  return { id, accession, patient, details, setup, vessels, vasoreactivity, findings };
}

/** Everything the report needs: the record, its analysis with the thresholds in force, and names. */
export async function reportInputFor(
  manager: EntityManager,
  record: StudyRecord,
  hospital: { name: string; lab: string } | null,
  at = new Date(),
): Promise<Omit<ReportInput, 'signature'>> {
  const thresholds = await thresholdsInForce(manager, at);
  const analysis = analyzeStudy({ ...toPhysiologyInput(record), thresholds: thresholds.overrides });
  const [operator] = record.details.operatorId
    ? await manager.query(`SELECT display_name FROM app_user WHERE id = $1`, [record.details.operatorId])
    : [];
  return {
    study: reportStudyOf(record),
    analysis,
    thresholds: thresholds.values,
    people: { operator: operator?.display_name ?? null },
    hospital,
  };
}
