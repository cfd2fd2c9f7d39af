import type { DataSource } from 'typeorm';
import { recordAudit, type AuditActor } from '../audit/audit';
import { listCaughtMail } from './queries/caught-mail';

/** What the local mail stand-in caught, newest first; the read recorded in the audit trail. */
export async function readCaughtMail(dataSource: DataSource, listUrl: string | null, actor: AuditActor): Promise<Awaited<ReturnType<typeof listCaughtMail>>> {
  const result = await listCaughtMail(listUrl);
  await recordAudit(dataSource, { ...actor, action: 'search', entityType: 'mail', outcome: 'success', detail: { view: 'caught-mail', returned: result.items.length } });
  return result;
}
