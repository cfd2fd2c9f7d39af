import type { DataSource } from 'typeorm';
import { recordAudit, type AuditActor } from '../audit/audit';
import { listAwaitingSignature } from './queries/awaiting-signature';

/** Studies awaiting signature (the user's own, and all of them); the ids shown recorded in the audit trail. */
export async function readAwaitingSignature(dataSource: DataSource, operatorId: string, actor: AuditActor): Promise<Awaited<ReturnType<typeof listAwaitingSignature>>> {
  const result = await listAwaitingSignature(dataSource, operatorId);
  const studyIds = [...new Set([...result.mine.items, ...result.all.items].map((s) => s.id))];
  await recordAudit(dataSource, { ...actor, action: 'search', entityType: 'study', outcome: 'success', detail: { view: 'awaiting-my-signature', returned: studyIds.length, studyIds } });
  return result;
}
