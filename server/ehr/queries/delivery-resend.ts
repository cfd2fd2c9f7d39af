import type { DataSource } from 'typeorm';
import { ReportDelivery } from '../../db/entities/report-delivery.entity';
import { ReportVersion } from '../../db/entities/report-version.entity';
import { RecordNotFoundError } from '../../errors';
import { enqueueDelivery, insertDeliveryRow } from '../enqueue-delivery';
import { DeliveryBusyError } from '../errors';

/**
 * Sends a signed report version again: the delivery goes back to queued, its time limit starts anew,
 * and a job is queued in the same transaction. Safe to repeat: the bundle is the same bytes with the
 * same Bundle.identifier, so the EHR recognises it (and conditional updates by identifier never make a
 * second report). Refused while a sender holds the delivery.
 */
export async function requeueDelivery(dataSource: DataSource, reportVersionId: string, requestedBy: string | null): Promise<{ studyId: string; previousStatus: string }> {
  return dataSource.transaction(async (manager) => {
    const version = await manager.findOne(ReportVersion, { select: { id: true, studyId: true }, where: { id: reportVersionId } });
    if (!version) throw new RecordNotFoundError('No signed report version has this id.');
    await insertDeliveryRow(manager, reportVersionId, version.studyId);
    const {
      entities: [current],
      raw: [lease],
    } = await manager
      .createQueryBuilder(ReportDelivery, 'd')
      .select(['d.id', 'd.status'])
      // The lease is judged by the database's clock, as the senders judge it.
      .addSelect('d.leaseUntil > now()', 'leased')
      .where('d.reportVersionId = :reportVersionId', { reportVersionId })
      .setLock('pessimistic_write')
      .getRawAndEntities<{ leased: boolean | null }>();
    if (current.status === 'sending' && lease.leased) throw new DeliveryBusyError();
    await manager.update(
      ReportDelivery,
      { reportVersionId },
      {
        status: 'queued',
        queuedAt: () => 'now()',
        firstAttemptAt: null,
        nextAttemptAt: null,
        stoppedAt: null,
        leaseUntil: null,
        resendRequestedBy: requestedBy,
        resendRequestedAt: () => 'now()',
        updatedAt: () => 'now()',
      },
    );
    await enqueueDelivery(manager, reportVersionId);
    return { studyId: version.studyId, previousStatus: current.status };
  });
}
