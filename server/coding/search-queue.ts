import type { DataSource } from 'typeorm';
import type { CodingQueueQuery, QueueItem } from '../../shared/coding/review';
import { recordAudit, type AuditActor } from '../audit/audit';
import { listQueue } from './queries/queue';

/** The coding queue under the filters, the search recorded in the audit trail with the studies it showed. */
export async function searchCodingQueue(dataSource: DataSource, query: CodingQueueQuery, actor: AuditActor): Promise<QueueItem[]> {
  const items = await listQueue(dataSource.manager, query);
  await recordAudit(dataSource, { ...actor, action: 'search', entityType: 'study', outcome: 'success', detail: { queue: 'coding', ...query, returned: items.length, studyIds: items.map((i) => i.studyId) } });
  return items;
}
