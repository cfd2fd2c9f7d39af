import { once } from 'node:events';
import type { Writable } from 'node:stream';
import type { DataSource } from 'typeorm';
import { stringify } from 'csv-stringify/sync';
import { auditBundleWriter, toFhirAuditEvent, type AuditEventContext } from '../../fhir/audit-event';
import { csvExportOptions } from '../../shared/csv/neutralise';
import { filtersUsed, labelOfAction, type AuditExportFormat, type AuditFilters } from '../../shared/audit/trail';
import { recordAudit, type AuditActor } from './audit';
import { auditRowBatches, targetOf, type AuditTrailRow } from './queries/audit-trail';

/** A FHIR Bundle holds at most this many events; its `next` link continues from there. */
export const FHIR_EXPORT_PAGE = 10_000;
/** Rows read from the database per batch while an export streams. */
const BATCH = 1000;

/** The CSV's columns: header text and the cell of a row. */
const csvColumns: [header: string, cell: (r: AuditTrailRow) => string | null][] = [
  ['Recorded at (UTC)', (r) => r.recorded_at.toISOString()],
  ['Event id', (r) => r.id],
  ['User', (r) => r.actor_name],
  ['User id', (r) => r.actor_user_id],
  ['Role', (r) => r.actor_role],
  ['Action', (r) => r.action],
  ['Action (words)', (r) => labelOfAction(r.action)],
  ['Outcome', (r) => r.outcome],
  ['Record type', (r) => r.entity_type],
  ['Record id', (r) => r.entity_id],
  ['Record', (r) => targetOf(r)],
  ['Patient MRN', (r) => r.mrn],
  ['Accession', (r) => r.accession],
  ['Study id', (r) => r.study_id],
  ['Client address', (r) => r.client_address],
  ['Detail', (r) => (r.detail ? JSON.stringify(r.detail) : null)],
];

/** CSV text of rows (RFC 4180, CRLF), every cell through the product's one neutralising rule. */
export function auditRowsToCsv(rows: AuditTrailRow[], header: boolean): string {
  const records = rows.map((r) => csvColumns.map(([, cell]) => cell(r) ?? ''));
  return stringify(header ? [csvColumns.map(([h]) => h), ...records] : records, {
    ...csvExportOptions,
  });
}

export function toAuditRecord(r: AuditTrailRow) {
  return {
    id: r.id,
    recordedAt: r.recorded_at,
    actorUserId: r.actor_user_id,
    actorName: r.actor_name,
    actorRole: r.actor_role,
    action: r.action,
    actionLabel: labelOfAction(r.action),
    entityType: r.entity_type,
    entityId: r.entity_id,
    target: targetOf(r),
    clientAddress: r.client_address,
    outcome: r.outcome,
    detail: r.detail,
    patient: r.mrn ? { mrn: r.mrn, name: r.family_name ? `${r.family_name}, ${r.given_name ?? ''}`.trim() : null } : null,
  };
}

/** Writes, waiting while the client is slow to read; false once the client has gone. */
async function write(out: Writable, chunk: string): Promise<boolean> {
  if (out.destroyed) return false;
  if (!out.write(chunk)) {
    await Promise.race([once(out, 'drain'), once(out, 'close')]);
  }
  return !out.destroyed;
}

export interface ExportRequest {
  filters: AuditFilters;
  format: AuditExportFormat;
  cursor?: string;
  /** FHIR: events per Bundle (at most FHIR_EXPORT_PAGE). */
  count?: number;
  /** FHIR: the URL of this export and how to build the next one from a cursor. */
  selfUrl: string;
  nextUrl: (cursor: string) => string;
  fhir: AuditEventContext;
}

/**
 * Exports the filtered audit trail into `out` (see `streamAuditExport`), recording first who
 * exported it, in which format and with which filters. `start` runs before the first byte (headers).
 */
export async function exportAuditTrail(db: DataSource, req: ExportRequest, actor: AuditActor, out: Writable, start: () => void): Promise<void> {
  await recordAudit(db, {
    ...actor,
    action: 'export',
    entityType: 'audit-event',
    outcome: 'success',
    detail: { format: req.format, filters: filtersUsed(req.filters), ...(req.cursor ? { continued: true } : {}) },
  });
  await streamAuditExport(db, req, out, start);
}

/**
 * Streams the filtered audit trail as CSV (every row) or as a FHIR searchset Bundle (up to
 * FHIR_EXPORT_PAGE events, then a `next` link), one keyset batch at a time: memory stays at one
 * batch whatever the size. The first batch is read before `start` runs (headers), so a bad cursor
 * or a database outage still gets a proper error answer.
 */
export async function streamAuditExport(db: DataSource, req: ExportRequest, out: Writable, start: () => void): Promise<void> {
  const batches = auditRowBatches(db, req.filters, { cursor: req.cursor, batchSize: BATCH, max: req.format === 'fhir' ? Math.min(req.count ?? FHIR_EXPORT_PAGE, FHIR_EXPORT_PAGE) : undefined });
  let step = await batches.next();
  start();
  try {
    if (req.format === 'csv') {
      let header = true;
      if (step.done) await write(out, auditRowsToCsv([], true));
      while (!step.done) {
        if (!(await write(out, auditRowsToCsv(step.value, header)))) return;
        header = false;
        step = await batches.next();
      }
    } else {
      const bundle = auditBundleWriter({ id: `audit-trail-${Date.now()}`, timestamp: new Date(), selfUrl: req.selfUrl });
      if (!(await write(out, bundle.open()))) return;
      while (!step.done) {
        const text = step.value.map((r) => bundle.entry(toFhirAuditEvent(toAuditRecord(r), req.fhir))).join('');
        if (!(await write(out, text))) return;
        step = await batches.next();
      }
      const next = step.value.nextCursor;
      await write(out, bundle.close(next ? req.nextUrl(next) : null));
    }
    out.end();
  } catch (error) {
    // The answer has begun: all that is left is to cut it, so the client sees an incomplete download.
    out.destroy(error as Error);
  } finally {
    await batches.return({ nextCursor: null });
  }
}
