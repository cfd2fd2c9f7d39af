import type { DataSource } from 'typeorm';
import { recordAudit, type AuditActor } from '../audit/audit';
import { requeueDelivery } from './queries/delivery-resend';

/** Sends a signed report version to the EHR again at a user's request, recorded in the audit trail with the status it had. */
export async function requestResend(dataSource: DataSource, reportVersionId: string, actor: AuditActor): Promise<void> {
  const { studyId, previousStatus } = await requeueDelivery(dataSource, reportVersionId, actor.actorUserId ?? null);
  // The study's id in the detail files the event under its study (audit_event.study_id), so the trail finds it by study.
  await recordAudit(dataSource, { ...actor, action: 'update', entityType: 'report-delivery', entityId: reportVersionId, outcome: 'success', detail: { resend: true, previousStatus, studyId } });
}
