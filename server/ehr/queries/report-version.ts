import type { Bundle } from 'fhir/r4';
import type { EntityManager } from 'typeorm';
import { ReportVersion } from '../../db/entities/report-version.entity';
import { User } from '../../db/entities/user.entity';
import { buildReportBundle, type BundleContext, type StoredReportVersion } from '../build-report-bundle';

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
export async function loadReportVersion(manager: EntityManager, reportVersionId: string): Promise<LoadedReportVersion | undefined> {
  const { entities, raw } = await manager
    .createQueryBuilder(ReportVersion, 'rv')
    .innerJoin('rv.study', 'study')
    .innerJoin('rv.pdfFile', 'pdf')
    .leftJoin(ReportVersion, 'prev', 'prev.id = rv.supersedesId')
    // The operator as the signed snapshot names them (text: a snapshot's id is not checked as a uuid).
    .leftJoin(User, 'operator', `operator.id::text = rv.snapshot -> 'details' ->> 'operatorId'`)
    .select(['rv.id', 'rv.studyId', 'rv.versionNo', 'rv.status', 'rv.snapshot', 'rv.analysis', 'rv.thresholds', 'pdf.reportVersionId', 'pdf.pdf', 'pdf.pdfSha256', 'rv.signerName', 'rv.signedAt', 'study.id', 'study.accession'])
    .addSelect('prev.versionNo', 'previous_version_no')
    .addSelect('operator.displayName', 'operator_name')
    .where('rv.id = :reportVersionId', { reportVersionId })
    .getRawAndEntities<{ previous_version_no: number | null; operator_name: string | null }>();
  const [rv] = entities;
  if (!rv) return undefined;
  return {
    version: {
      id: rv.id,
      studyId: rv.studyId,
      versionNo: rv.versionNo,
      status: rv.status,
      snapshot: rv.snapshot,
      analysis: rv.analysis,
      thresholds: rv.thresholds,
      pdf: rv.pdfFile!.pdf,
      pdfSha256: rv.pdfFile!.pdfSha256,
      signerName: rv.signerName,
      signedAt: rv.signedAt,
    },
    previousVersionNo: raw[0].previous_version_no ?? undefined,
    operatorName: raw[0].operator_name,
    accession: rv.study!.accession,
  };
}

/** The transaction Bundle of a loaded version; a `BundleBuildError` when it cannot be built. */
export function bundleOfLoaded(loaded: LoadedReportVersion, identifierSystems: BundleContext['identifierSystems']): Bundle {
  return buildReportBundle(loaded.version, { previousVersionNo: loaded.previousVersionNo, operatorName: loaded.operatorName, identifierSystems });
}
