import type { DataSource } from 'typeorm';
import { recordAudit, type AuditActor } from '../audit/audit';
import { findSignedVersion, type Verification } from './queries/report-verification';

/** Which study and version a PDF or a printed fingerprint is; the check is recorded in the audit trail. */
export async function identifyReport(dataSource: DataSource, evidence: { pdf?: Buffer; fingerprint?: string }, actor: AuditActor): Promise<Verification> {
  const result = await findSignedVersion(dataSource, evidence);
  await recordAudit(dataSource, { ...actor, action: 'verify', entityType: 'study', entityId: result.studyId ?? null, outcome: 'success', detail: { found: result.found } });
  return result;
}
