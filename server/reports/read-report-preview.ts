import type { DataSource } from 'typeorm';
import type { Role } from '../../shared/auth/permissions';
import { recordAudit } from '../audit/audit';
import type { AuditActor } from '../studies/repository';
import { previewStudyReport, type ReportPreview } from './preview-report';
import type { ThresholdsChoice } from './report-input';

/** The report as it would be signed now, for one user, the read recorded in the audit trail. */
export async function readReportPreview(
  dataSource: DataSource,
  studyId: string,
  { role, hospital, thresholds, actor }: { role: Role | null; hospital: { name: string; lab: string } | null; thresholds: ThresholdsChoice; actor: AuditActor },
): Promise<ReportPreview> {
  const preview = await previewStudyReport(dataSource, studyId, role, hospital, thresholds);
  await recordAudit(dataSource, { ...actor, action: 'read', entityType: 'study', entityId: studyId, outcome: 'success', detail: { view: 'report' } });
  return preview;
}
