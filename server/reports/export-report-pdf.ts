import type { DataSource } from 'typeorm';
import { recordAudit, type AuditActor } from '../audit/audit';
import { ReportPdf } from '../db/entities/report-version.entity';
import { Study } from '../db/entities/study.entity';
import { RecordNotFoundError } from '../errors';

/**
 * A signed version's PDF, byte for byte as signed, with its checksum and a file name made of the
 * study's accession and the version number; the export is recorded in the audit trail.
 */
export async function exportReportPdf(dataSource: DataSource, reportVersionId: string, actor: AuditActor): Promise<{ fileName: string; pdf: Buffer; sha256: string }> {
  const file = await dataSource.getRepository(ReportPdf).findOne({
    where: { reportVersionId },
    relations: { version: true },
    select: { reportVersionId: true, pdf: true, pdfSha256: true, version: { id: true, studyId: true, versionNo: true } },
  });
  const version = file?.version;
  if (!file || !version) throw new RecordNotFoundError('No report version has this id.');
  const study = await dataSource.manager.findOne(Study, { where: { id: version.studyId }, select: { id: true, accession: true } });
  await recordAudit(dataSource, { ...actor, action: 'export', entityType: 'study', entityId: version.studyId, outcome: 'success', detail: { reportVersion: version.versionNo, format: 'pdf' } });
  return {
    fileName: `${String(study?.accession ?? 'report').replace(/[^A-Za-z0-9._-]/g, '_')}-v${version.versionNo}.pdf`,
    pdf: file.pdf,
    sha256: file.pdfSha256,
  };
}
