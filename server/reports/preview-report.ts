import type { DataSource } from 'typeorm';
import type { Role } from '../../shared/auth/permissions';
import { checkCompleteness } from '../../shared/report/completeness';
import { writtenValueMismatches } from '../../shared/report/written-values';
import { availableActions } from '../../shared/study/state-machine';
import { ReportVersion } from '../db/entities/report-version.entity';
import { RecordNotFoundError } from '../errors';
import { previewReport, reportDocument, reportKindOf } from '../report-document';
import { loadStudy } from '../studies/repository';
import type { ReportPreview } from '../../shared/report/preview';
import { thresholdLabels } from '../../shared/physiology/thresholds';
import { thresholdKeys } from '../../shared/settings/threshold-ranges';
import { amendedVersionOf, reportInputFor, thresholdsFor, type ThresholdsChoice } from './report-input';
import { summariseVersion } from './sign-study';

/** The report as it would be signed now, whether it can be signed, and the versions signed so far. */
export async function previewStudyReport(
  dataSource: DataSource,
  studyId: string,
  role: Role | null,
  hospital: { name: string; lab: string } | null,
  choice: ThresholdsChoice = 'original',
): Promise<ReportPreview> {
  const record = await loadStudy(dataSource, studyId);
  if (!record) throw new RecordNotFoundError('No study has this id.');
  const now = new Date();
  const input = await reportInputFor(dataSource.manager, record, hospital, now, choice);
  let thresholdChoice: ReportPreview['thresholds']['choice'] = null;
  if (record.state === 'amending') {
    const [original, current] = await Promise.all([thresholdsFor(dataSource.manager, record, now, 'original'), thresholdsFor(dataSource.manager, record, now, 'current')]);
    thresholdChoice = {
      chosen: choice,
      differences: thresholdKeys
        .filter((k) => original.values[k] !== current.values[k])
        .map((k) => ({ key: k, label: thresholdLabels[k][0], original: original.values[k], current: current.values[k] })),
    };
  }
  const amends = record.state === 'amending' ? await amendedVersionOf(dataSource.manager, studyId) : null;
  const { view, narrative } = previewReport({ ...input, amends });
  const versions = await dataSource.manager.find(ReportVersion, {
    where: { studyId },
    order: { versionNo: 'ASC' },
    relations: { pdfFile: true },
    select: { id: true, studyId: true, versionNo: true, status: true, signedAt: true, signerName: true, contentSha256: true, pdfFile: { reportVersionId: true, pdfSha256: true } },
  });
  return {
    studyId,
    studyVersion: record.version,
    state: record.state,
    kind: reportKindOf(input.study),
    html: narrative.html,
    text: narrative.text,
    document: reportDocument(view),
    completeness: checkCompleteness(record),
    writtenValues: writtenValueMismatches(record.findings, input.analysis),
    versions: versions.map((v) => summariseVersion(v, v.pdfFile?.pdfSha256 ?? '')),
    actions: availableActions(record.state, role),
    thresholds: { ...input.thresholdsBasis, choice: thresholdChoice },
  };
}
