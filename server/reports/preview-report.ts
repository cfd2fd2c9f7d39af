import type { DataSource } from 'typeorm';
import type { Role } from '../../shared/auth/permissions';
import { checkCompleteness, type CompletenessResult } from '../../shared/report/completeness';
import { availableActions, type StudyAction } from '../../shared/study/state-machine';
import { ReportVersion } from '../db/entities/report-version.entity';
import { NotFoundError } from '../http/problem';
import type { ReportDocument } from '../../shared/report/document';
import { previewReport, reportDocument, reportKindOf } from '../report';
import { loadStudy } from '../studies/repository';
import { reportInputFor } from './report-input';
import { summariseVersion, type SignedVersionSummary } from './sign-study';

export interface ReportPreview {
  studyId: string;
  /** The study version this preview was built from: signing names it, and a later change refuses the signature. */
  studyVersion: number;
  state: string;
  kind: string;
  html: string;
  text: string;
  /** The same narrative as structured data, for a preview laid out as text (never as markup). */
  document: ReportDocument;
  completeness: CompletenessResult;
  versions: SignedVersionSummary[];
  actions: StudyAction[];
}

/** The report as it would be signed now, whether it can be signed, and the versions signed so far. */
export async function previewStudyReport(dataSource: DataSource, studyId: string, role: Role | null, hospital: { name: string; lab: string } | null): Promise<ReportPreview> {
  const record = await loadStudy(dataSource, studyId);
  if (!record) throw new NotFoundError('No study has this id.');
  const input = await reportInputFor(dataSource.manager, record, hospital);
  const { view, narrative } = previewReport(input);
  const versions = await dataSource.manager.find(ReportVersion, {
    where: { studyId },
    order: { versionNo: 'ASC' },
    select: { id: true, studyId: true, versionNo: true, status: true, signedAt: true, signerName: true, pdfSha256: true, contentSha256: true },
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
    versions: versions.map(summariseVersion),
    actions: availableActions(record.state, role),
  };
}
