import type { DataSource, EntityManager } from 'typeorm';
import { checkCompleteness } from '../../shared/report/completeness';
import type { Role } from '../../shared/auth/permissions';
import { checkTransition } from '../../shared/study/state-machine';
import type { StudyState } from '../../shared/study/vocabulary';
import { recordAudit, type AuditEntry } from '../audit/audit';
import { ReportVersion } from '../db/entities/report-version.entity';
import { BadRequestError, NotFoundError } from '../http/problem';
import { ATTESTATION, prepareSignedReport } from '../report';
import { loadStudy, StaleVersionError } from '../studies/repository';
import { IncompleteStudyError, TransitionRefusedError } from './errors';
import { onReportSigned } from './on-report-signed';
import { reportInputFor, type ThresholdsChoice } from './report-input';
import { lockStudy } from '../studies/lock-study';

export interface Signer {
  userId: string;
  displayName: string;
  role: Role | null;
}

export interface SignStudyRequest {
  studyId: string;
  /** The study version the signer previewed; a study changed since then is not signed. */
  studyVersion: number;
  signer: Signer;
  /** Required for an addendum: why the signed report changes. */
  reason?: string | null;
  /** An addendum keeps the amended version's thresholds unless the physician chooses those now in force. */
  thresholds?: ThresholdsChoice;
  hospital: { name: string; lab: string } | null;
  audit: Pick<AuditEntry, 'actorUserId' | 'actorName' | 'actorRole' | 'clientAddress'>;
  /** The signing time; the transaction's clock by default. */
  now?: Date;
}

export interface SignedVersionSummary {
  id: string;
  studyId: string;
  versionNo: number;
  status: 'final' | 'amended';
  signedAt: string;
  signerName: string;
  pdfSha256: string;
  contentSha256: string;
}

export const summariseVersion = (v: ReportVersion): SignedVersionSummary => ({
  id: v.id,
  studyId: v.studyId,
  versionNo: v.versionNo,
  status: v.status,
  signedAt: v.signedAt.toISOString(),
  signerName: v.signerName,
  pdfSha256: v.pdfSha256,
  contentSha256: v.contentSha256,
});

/**
 * Signs exactly what was previewed, in one transaction: the study row is locked, its state and version
 * checked, completeness checked, the report built and stored as an immutable version, the study's state
 * moved, the audit row written and the follow-up jobs queued. Two physicians signing at once: the second
 * waits on the lock, then finds the state or version moved and gets 409.
 */
export async function signStudy(dataSource: DataSource, req: SignStudyRequest): Promise<SignedVersionSummary> {
  return dataSource.transaction(async (manager) => {
    const row = await lockStudy(manager, req.studyId);
    if (!row) throw new NotFoundError('No study has this id.');
    const state = row.state as StudyState;
    const addendum = state === 'amending';
    const refusal = checkTransition(state, addendum ? 'sign-addendum' : 'sign', req.signer.role, req.reason);
    if (refusal) throw new TransitionRefusedError(refusal, refusal === 'wrong-state' ? `A ${state} study cannot be signed.` : refusal === 'reason-required' ? 'An addendum needs the reason for the change.' : 'Only a physician may sign.');
    const record = (await loadStudy(manager, req.studyId))!;
    if (record.version !== req.studyVersion) throw new StaleVersionError(record);
    if (!addendum && req.thresholds === 'original') {
      throw new BadRequestError('Only an addendum can keep the thresholds of an earlier version.', [{ pointer: '/thresholds', detail: 'A first signature uses the thresholds in force; leave thresholds out or send "current".' }]);
    }
    const completeness = checkCompleteness(record);
    if (!completeness.complete) throw new IncompleteStudyError(completeness.missing);

    const previous = await latestVersion(manager, req.studyId);
    const [{ now }] = await manager.query(`SELECT now() AS now`);
    const signedAt: Date = req.now ?? now;
    const input = await reportInputFor(manager, record, req.hospital, signedAt, req.thresholds ?? 'original');
    const prepared = await prepareSignedReport(input, {
      signer: { id: req.signer.userId, name: req.signer.displayName },
      signedAt: signedAt.toISOString(),
      reportVersion: (previous?.versionNo ?? 0) + 1,
      amends: previous?.versionNo ?? null,
      amendmentReason: addendum ? (req.reason ?? null) : null,
    });
    const version = manager.create(ReportVersion, {
      studyId: req.studyId,
      versionNo: (previous?.versionNo ?? 0) + 1,
      studyVersion: record.version,
      status: previous ? 'amended' : 'final',
      supersedesId: previous?.id ?? null,
      reason: addendum ? (req.reason ?? null) : null,
      narrativeHtml: prepared.htmlDocument,
      narrativeText: prepared.narrative.text,
      snapshot: prepared.content.record,
      analysis: prepared.content.analysis,
      thresholds: prepared.content.thresholds,
      templateVersion: prepared.content.templateVersion,
      thresholdsBasis: input.thresholdsBasis.basis,
      thresholdSetId: input.thresholdsBasis.setId,
      pdf: prepared.pdf,
      pdfSha256: prepared.pdfSha256,
      contentSha256: prepared.fingerprint,
      signedBy: req.signer.userId,
      signerName: req.signer.displayName,
      signedAt,
      attestation: prepared.content.attestation ?? ATTESTATION,
    });
    const saved = await manager.save(version);
    await manager.query(`UPDATE study SET state = $2, version = version + 1, updated_at = now() WHERE id = $1`, [req.studyId, addendum ? 'amended' : 'signed']);
    await recordAudit(manager, {
      ...req.audit,
      action: addendum ? 'sign-addendum' : 'sign',
      entityType: 'study',
      entityId: req.studyId,
      outcome: 'success',
      detail: {
        reportVersion: saved.versionNo,
        reportVersionId: saved.id,
        fromStudyVersion: record.version,
        contentSha256: saved.contentSha256,
        templateVersion: saved.templateVersion,
        thresholds: { basis: input.thresholdsBasis.basis, thresholdSetId: input.thresholdsBasis.setId, ...(addendum ? { choice: req.thresholds ?? 'original' } : {}) },
      },
    });
    await onReportSigned(manager, saved.id);
    return summariseVersion(saved);
  });
}

export async function latestVersion(manager: EntityManager, studyId: string): Promise<ReportVersion | null> {
  return manager.findOne(ReportVersion, { where: { studyId }, order: { versionNo: 'DESC' } });
}
