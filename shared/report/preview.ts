import type { StudyAction } from '../study/state-machine';
import type { CompletenessResult } from './completeness';
import type { ReportDocument } from './document';
import type { ThresholdsBasisInfo, ThresholdsChoice } from './thresholds-basis';
import type { ReportVersionStatus } from './version-status';
import type { WrittenValueMismatch } from './written-values';

/** A signed version as the report's page lists it. */
export interface SignedVersionSummary {
  id: string;
  studyId: string;
  versionNo: number;
  status: ReportVersionStatus;
  /** ISO instant. */
  signedAt: string;
  signerName: string;
  /** SHA-256 of the stored PDF (hex). */
  pdfSha256: string;
  /** SHA-256 of the signed content (hex). */
  contentSha256: string;
}

/** The answer of `GET /api/studies/:id/report`: the report as it would be signed now, whether it can be, and the versions signed so far. */
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
  /** Values typed in the impression or plan that differ from what was measured (a caution; signing is not refused). */
  writtenValues: WrittenValueMismatch[];
  versions: SignedVersionSummary[];
  actions: StudyAction[];
  /** The thresholds that judge this preview, and for an open addendum the choice between the amended version's and those in force now. */
  thresholds: ThresholdsBasisInfo & {
    choice: null | {
      chosen: ThresholdsChoice;
      /** Cut-offs whose value differs between the two; empty when the choice changes nothing. */
      differences: Array<{ key: string; label: string; original: number; current: number }>;
    };
  };
}
