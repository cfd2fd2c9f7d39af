import type { DataSource } from 'typeorm';
import { recordAudit } from '../audit/audit';
import { ReportVersion } from '../db/entities/report-version.entity';
import { RecordNotFoundError } from '../errors';
import type { AuditActor } from '../studies/repository';

/**
 * A signed version's PDF, byte for byte as signed, with its checksum and a file name made of the
 * study's accession and the version number; the export is recorded in the audit trail.
 */
export async function exportReportPdf(dataSource: DataSource, reportVersionId: string, actor: AuditActor): Promise<{ fileName: string; pdf: Buffer; sha256: string }> {
  const version = await dataSource.getRepository(ReportVersion).findOne({ where: { id: reportVersionId }, select: { id: true, studyId: true, versionNo: true, pdf: true, pdfSha256: true } });
  if (!version) throw new RecordNotFoundError('No report version has this id.');
  const [study] = await dataSource.query(`SELECT accession FROM study WHERE id = $1`, [version.studyId]);
  await recordAudit(dataSource, { ...actor, action: 'export', entityType: 'study', entityId: version.studyId, outcome: 'success', detail: { reportVersion: version.versionNo, format: 'pdf' } });
  return {
    fileName: `${String(study?.accession ?? 'report').replace(/[^A-Za-z0-9._-]/g, '_')}-v${version.versionNo}.pdf`,
    pdf: version.pdf,
    sha256: version.pdfSha256,
  };
}
