import type { DataSource } from 'typeorm';
import type { ReviewView } from '../../shared/coding/review';
import { recordAudit, type AuditActor } from '../audit/audit';
import { loadReview } from './queries/review';

/** A study's code review, the read recorded in the audit trail. */
export async function readReview(dataSource: DataSource, studyId: string, actor: AuditActor): Promise<ReviewView> {
  const review = await loadReview(dataSource.manager, studyId);
  await recordAudit(dataSource, { ...actor, action: 'read', entityType: 'study', entityId: studyId, outcome: 'success', detail: { view: 'coding' } });
  return review;
}
