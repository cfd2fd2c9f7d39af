import { createHash } from 'node:crypto';
import type { DataSource } from 'typeorm';
import { ReportPdf, ReportVersion } from '../../db/entities/report-version.entity';
import { Study } from '../../db/entities/study.entity';
import type { ReportVersionStatus } from '../../../shared/report/version-status';

export interface Verification {
  found: boolean;
  studyId?: string;
  accession?: string;
  versionNo?: number;
  status?: ReportVersionStatus;
  signedAt?: string;
  signerName?: string;
  /** The newest version of the same study, when this one has been superseded. */
  supersededBy?: { versionNo: number; signedAt: string } | null;
}

const hex = /^[0-9a-f]+$/;

/**
 * Which signed version a PDF (its bytes) or a printed fingerprint belongs to, and whether a newer
 * version supersedes it. A printed short fingerprint (at least 12 hex characters) is matched by prefix.
 */
export async function findSignedVersion(dataSource: DataSource, evidence: { pdf?: Buffer; fingerprint?: string }): Promise<Verification> {
  const repo = dataSource.getRepository(ReportVersion);
  let version: ReportVersion | null = null;
  if (evidence.pdf) {
    const sha = createHash('sha256').update(evidence.pdf).digest('hex');
    const file = await dataSource.getRepository(ReportPdf).findOne({ where: { pdfSha256: sha }, relations: { version: true }, select: { reportVersionId: true, version: selectedObject } });
    version = file?.version ?? null;
  } else if (evidence.fingerprint) {
    const fp = evidence.fingerprint.trim().toLowerCase().replace(/[\s:-]/g, '');
    if (fp.length >= 12 && fp.length <= 64 && hex.test(fp)) {
      version = await repo
        .createQueryBuilder('v')
        .select(selected.map((c) => `v.${c}`))
        .where('v.content_sha256 LIKE :prefix', { prefix: `${fp}%` })
        .orderBy('v.signed_at', 'DESC')
        .getOne();
    }
  }
  if (!version) return { found: false };
  const study = await dataSource.manager.findOne(Study, { where: { id: version.studyId }, select: { id: true, accession: true } });
  const newest = await repo.findOne({ where: { studyId: version.studyId }, order: { versionNo: 'DESC' }, select: { versionNo: true, signedAt: true } });
  return {
    found: true,
    studyId: version.studyId,
    accession: study?.accession,
    versionNo: version.versionNo,
    status: version.status,
    signedAt: version.signedAt.toISOString(),
    signerName: version.signerName,
    supersededBy: newest && newest.versionNo > version.versionNo ? { versionNo: newest.versionNo, signedAt: newest.signedAt.toISOString() } : null,
  };
}

const selected = ['id', 'studyId', 'versionNo', 'status', 'signedAt', 'signerName'] as const;
const selectedObject = Object.fromEntries(selected.map((c) => [c, true])) as Record<(typeof selected)[number], true>;
