import type { PhysiologyResult, Thresholds } from '../../shared/physiology';
import { fingerprint, renderReportPdf, sha256Hex } from './pdf';
import { htmlDocument, renderNarrative, renderNarrativeText, type Narrative } from './render';
import { buildReportView, signatureView, type ReportInput, type ReportStudy, type ReportView } from './view-model';
import type { ThresholdsBasisInfo } from '../../shared/report/thresholds-basis';

export { canonicalContent, fingerprint, fingerprintInPdf, renderReportPdf, sha256Hex, PAGE } from './pdf';
export { renderNarrative, htmlDocument, type Narrative } from './render';
export { reportDocument } from './document';
export { buildReportView, reportKindOf, type AmendedVersion, type ReportInput, type ReportStudy, type ReportView } from './view-model';

/** The statement the signer makes, stored with each version. */
export const ATTESTATION =
  'I performed or supervised this procedure, reviewed its measurements and this report, and confirm that the report is accurate and complete.';

/**
 * What a signature covers, as one plain-data object: the identifiers, the template version, the
 * narrative exactly as previewed (before the signature block is added), the structured record, the
 * analysis and the thresholds it used, the signer, the time and the attestation. Its SHA-256 over the
 * canonical JSON (`fingerprint`) is printed on every page of the PDF.
 */
export interface SignedContent {
  format: 'isobar-signed-report/1';
  studyId: string;
  accession: string;
  reportVersion: number;
  /** The version this one amends; null for the first. */
  amends: number | null;
  amendmentReason: string | null;
  templateVersion: string;
  narrative: string;
  record: ReportStudy;
  analysis: PhysiologyResult;
  thresholds: Thresholds;
  /** Which thresholds judged it (in force at signing, or an addendum's choice) and the set they came from. */
  thresholdsBasis?: ThresholdsBasisInfo | null;
  signer: { id: string; name: string };
  signedAt: string;
  attestation: string;
}

export interface SignRequest {
  signer: { id: string; name: string };
  /** ISO 8601 time of signing (the transaction's time). */
  signedAt: string;
  /** 1 for the first signature, then the previous version + 1. */
  reportVersion: number;
  amends?: number | null;
  amendmentReason?: string | null;
  attestation?: string;
}

export interface PreparedReport {
  view: ReportView;
  narrative: Narrative;
  /** The narrative's HTML as a standalone page. */
  htmlDocument: string;
  content: SignedContent;
  /** SHA-256 (hex) of the canonical signed content. */
  fingerprint: string;
  pdf: Buffer;
  /** SHA-256 (hex) of the PDF bytes. */
  pdfSha256: string;
}

/** The unsigned report, as the preview shows it. */
export function previewReport(input: Omit<ReportInput, 'signature'>): { view: ReportView; narrative: Narrative } {
  const view = buildReportView({ ...input, signature: null });
  return { view, narrative: renderNarrative(view) };
}

/** A signed report before its PDF is rendered. */
export type SignedReportText = Omit<PreparedReport, 'pdf' | 'pdfSha256'>;

/** The signed view and the content its fingerprint covers: all a signed version's PDF needs. */
export interface SignedView {
  view: ReportView;
  content: SignedContent;
  /** SHA-256 (hex) of the canonical signed content. */
  fingerprint: string;
}

/**
 * Built from the same input as the preview: the content and its fingerprint, then the signed view that
 * prints it. Enough to render the PDF while the narrative is rendered beside it (`signedNarrative`).
 */
export function prepareSignedView(input: Omit<ReportInput, 'signature'>, sign: SignRequest): SignedView {
  // The view as previewed; the signed view differs only by its signature block (see signatureView).
  const unsigned = buildReportView({ ...input, signature: null });
  const content: SignedContent = {
    format: 'isobar-signed-report/1',
    studyId: input.study.id,
    accession: input.study.accession,
    reportVersion: sign.reportVersion,
    amends: sign.amends ?? null,
    amendmentReason: sign.amendmentReason ?? null,
    templateVersion: unsigned.templateVersion,
    narrative: renderNarrativeText(unsigned),
    record: input.study,
    analysis: input.analysis,
    thresholds: input.thresholds,
    ...(input.thresholdsBasis ? { thresholdsBasis: input.thresholdsBasis } : {}),
    signer: sign.signer,
    signedAt: sign.signedAt,
    attestation: sign.attestation ?? ATTESTATION,
  };
  const fp = fingerprint(content);
  const signature = { signedBy: sign.signer.name, signedAt: sign.signedAt, reportVersion: sign.reportVersion, fingerprint: fp, amendmentReason: sign.amendmentReason ?? null };
  // The signed view adds the signature block, and to an addendum's block the reason now given.
  const view: ReportView = {
    ...unsigned,
    signature: signatureView(signature, input.timeZone ?? 'UTC'),
    amendment: unsigned.amendment ? { ...unsigned.amendment, reason: sign.amendmentReason?.trim() || null } : null,
  };
  return { view, content, fingerprint: fp };
}

/** The signed view's narrative (text and HTML) and the HTML as a standalone page. */
export function signedNarrative(view: ReportView): { narrative: Narrative; htmlDocument: string } {
  const narrative = renderNarrative(view);
  return { narrative, htmlDocument: htmlDocument(view, narrative.html) };
}

/**
 * Everything a signed version stores but its PDF: `prepareSignedView`, then `signedNarrative`. Pure;
 * the same input gives identical output.
 */
export function prepareSignedText(input: Omit<ReportInput, 'signature'>, sign: SignRequest): SignedReportText {
  const signed = prepareSignedView(input, sign);
  return { ...signed, ...signedNarrative(signed.view) };
}

/**
 * Everything a signed version stores, its PDF rendered in this thread (for tools and tests; a signature
 * renders the same bytes in a rendering thread, see pdf-threads.ts).
 */
export async function prepareSignedReport(input: Omit<ReportInput, 'signature'>, sign: SignRequest): Promise<PreparedReport> {
  const text = prepareSignedText(input, sign);
  const pdf = await renderReportPdf(text.view);
  return { ...text, pdf, pdfSha256: sha256Hex(pdf) };
}
