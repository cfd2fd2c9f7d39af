import type { DataSource } from 'typeorm';
import { recordAudit, type AuditActor } from '../audit/audit';
import { listReviewedCodes, type ExportedCode } from './queries/reviewed-codes';

/** The reviewed codes of the studies coded between two days, the export recorded in the audit trail with its format and the studies it held. */
export async function exportReviewedCodes(dataSource: DataSource, { from, to, format }: { from: string; to: string; format: string }, actor: AuditActor): Promise<ExportedCode[]> {
  const rows = await listReviewedCodes(dataSource.manager, from, to);
  await recordAudit(dataSource, { ...actor, action: 'export', entityType: 'study-coding', outcome: 'success', detail: { from, to, format, codes: rows.length, accessions: [...new Set(rows.map((r) => r.accession))] } });
  return rows;
}
