import type { DataSource } from 'typeorm';
import type { DeliveryListItem, DeliveryStatus } from '../../shared/delivery/status';
import { recordAudit, type AuditActor } from '../audit/audit';
import { listDeliveriesNeedingAttention } from './queries/deliveries';

/** The deliveries needing attention, the read recorded in the audit trail with the report versions it showed. */
export async function searchDeliveries(dataSource: DataSource, statuses: readonly DeliveryStatus[] | undefined, actor: AuditActor): Promise<DeliveryListItem[]> {
  const items = await listDeliveriesNeedingAttention(dataSource, { statuses });
  await recordAudit(dataSource, {
    ...actor,
    action: 'search',
    entityType: 'report-delivery',
    outcome: 'success',
    detail: { statuses: statuses ?? null, returned: items.length, reportVersionIds: items.map((i) => i.reportVersionId) },
  });
  return items;
}
