import type { Bundle } from 'fhir/r4';
import { buildReportBundle, type BundleContext, type StoredReportVersion } from '../build-report-bundle';

/** Rows of a query (pg's `rows`): the task runs on the job queue's connection, routes on TypeORM's. */
export type Query = (sql: string, params?: unknown[]) => Promise<Record<string, unknown>[]>;

/** A stored, signed report version with what its bundle needs beyond its own row. */
export interface LoadedReportVersion {
  version: StoredReportVersion;
  /** The number of the version it supersedes (an addendum). */
  previousVersionNo?: number;
  /** The display name of the study's operator, as recorded in the signed snapshot. */
  operatorName: string | null;
  accession: string;
}

/** Reads a signed report version as it was stored; undefined when there is no such version. */
export async function loadReportVersion(query: Query, reportVersionId: string): Promise<LoadedReportVersion | undefined> {
  const [row] = await query(
    `SELECT rv.id, rv.study_id, rv.version_no, rv.status, rv.snapshot, rv.analysis, rv.thresholds, pdf.pdf, pdf.pdf_sha256,
            rv.signer_name, rv.signed_at, prev.version_no AS previous_version_no, operator.display_name AS operator_name,
            study.accession
       FROM report_version rv
       JOIN study ON study.id = rv.study_id
       JOIN report_pdf pdf ON pdf.report_version_id = rv.id
       LEFT JOIN report_version prev ON prev.id = rv.supersedes_id
       LEFT JOIN app_user operator ON operator.id::text = rv.snapshot -> 'details' ->> 'operatorId'
      WHERE rv.id = $1`,
    [reportVersionId],
  );
  if (!row) return undefined;
  return {
    version: {
      id: row.id as string,
      studyId: row.study_id as string,
      versionNo: row.version_no as number,
      status: row.status as 'final' | 'amended',
      snapshot: row.snapshot,
      analysis: row.analysis,
      thresholds: row.thresholds,
      pdf: row.pdf as Buffer,
      pdfSha256: row.pdf_sha256 as string,
      signerName: row.signer_name as string,
      signedAt: row.signed_at as Date,
    },
    previousVersionNo: (row.previous_version_no as number | null) ?? undefined,
    operatorName: row.operator_name as string | null,
    accession: row.accession as string,
  };
}

/** The transaction Bundle of a loaded version; a `BundleBuildError` when it cannot be built. */
export function bundleOfLoaded(loaded: LoadedReportVersion, identifierSystems: BundleContext['identifierSystems']): Bundle {
  return buildReportBundle(loaded.version, { previousVersionNo: loaded.previousVersionNo, operatorName: loaded.operatorName, identifierSystems });
}
