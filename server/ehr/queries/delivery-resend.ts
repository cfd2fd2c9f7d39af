import type { DataSource } from 'typeorm';
import { RecordNotFoundError } from '../../errors';
import { enqueueDelivery } from '../enqueue-delivery';

export class DeliveryBusyError extends Error {
  constructor() {
    super('This report is being sent to the EHR right now; look again in a minute.');
  }
}

/**
 * Sends a signed report version again: the delivery goes back to queued, its time limit starts anew,
 * and a job is queued in the same transaction. Safe to repeat: the bundle is the same bytes with the
 * same Bundle.identifier, so the EHR recognises it (and conditional updates by identifier never make a
 * second report). Refused while a sender holds the delivery.
 */
export async function resendDelivery(dataSource: DataSource, reportVersionId: string, requestedBy: string | null): Promise<{ studyId: string; previousStatus: string }> {
  return dataSource.transaction(async (manager) => {
    const [version] = await manager.query(`SELECT study_id FROM report_version WHERE id = $1`, [reportVersionId]);
    if (!version) throw new RecordNotFoundError('No signed report version has this id.');
    await manager.query(
      `INSERT INTO report_delivery (report_version_id, study_id) VALUES ($1, $2) ON CONFLICT (report_version_id) DO NOTHING`,
      [reportVersionId, version.study_id],
    );
    const [current] = await manager.query(`SELECT status, lease_until > now() AS leased FROM report_delivery WHERE report_version_id = $1 FOR UPDATE`, [reportVersionId]);
    if (current.status === 'sending' && current.leased) throw new DeliveryBusyError();
    await manager.query(
      `UPDATE report_delivery
          SET status = 'queued', queued_at = now(), first_attempt_at = NULL, next_attempt_at = NULL, stopped_at = NULL,
              lease_until = NULL, resend_requested_by = $2, resend_requested_at = now(), updated_at = now()
        WHERE report_version_id = $1`,
      [reportVersionId, requestedBy],
    );
    await enqueueDelivery(manager, reportVersionId);
    return { studyId: version.study_id as string, previousStatus: current.status as string };
  });
}
