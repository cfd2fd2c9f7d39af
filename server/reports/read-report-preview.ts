import type { DataSource } from 'typeorm';
import type { Role } from '../../shared/auth/permissions';
import { recordStudyReadOnce, type AuditActor } from '../audit/audit';
import type { ReportPreview } from '../../shared/report/preview';
import { previewStudyReport } from './preview-report';
import type { ThresholdsChoice } from './report-input';

/** The report as it would be signed now, for one user, the read recorded in the audit trail (once per window). */
export async function readReportPreview(
  dataSource: DataSource,
  studyId: string,
  { role, hospital, thresholds, actor, auditWindowSeconds }: { role: Role | null; hospital: { name: string; lab: string } | null; thresholds: ThresholdsChoice; actor: AuditActor; auditWindowSeconds: number },
): Promise<ReportPreview> {
  const preview = await previewStudyReport(dataSource, studyId, role, hospital, thresholds);
  // Refreshed after each autosave: one read per user, study and address within the window.
  await recordStudyReadOnce(dataSource, { ...actor, action: 'read', entityId: studyId, outcome: 'success', detail: { view: 'report', studyVersion: preview.studyVersion } }, auditWindowSeconds);
  return preview;
}
