import type { Writable } from 'node:stream';
import type { DataSource } from 'typeorm';
import { recordAudit, type AuditActor } from '../audit/audit';
import { codesToCsv, listReviewedCodes } from './queries/reviewed-codes';

/**
 * The reviewed codes of the studies coded between two days into `out`, as CSV or as JSON
 * (`{ from, to, items }`), the export recorded in the audit trail with its format and the studies
 * it held. `start` runs before the first byte (headers).
 */
export async function exportReviewedCodes(dataSource: DataSource, { from, to, format }: { from: string; to: string; format: string }, actor: AuditActor, out: Writable, start: () => void): Promise<void> {
  const rows = await listReviewedCodes(dataSource.manager, from, to);
  await recordAudit(dataSource, { ...actor, action: 'export', entityType: 'study-coding', outcome: 'success', detail: { from, to, format, codes: rows.length, accessions: [...new Set(rows.map((r) => r.accession))] } });
  start();
  out.end(format === 'json' ? JSON.stringify({ from, to, items: rows }) : codesToCsv(rows));
}
