import { stringify } from 'csv-stringify';
import type { Writable } from 'node:stream';
import type { DataSource } from 'typeorm';
import { csvExportOptions } from '../../../shared/csv/neutralise';
import type { TurnaroundQuery } from '../../../shared/turnaround/query';
import { intervalColumns, rangeCondition } from './figures';
import type { TurnaroundSettings } from '../../../shared/settings/lab-settings';

const columns = [
  'accession',
  'state',
  'clock_started_at',
  'clock_starts_at',
  'physician',
  'signed_at',
  'codes_reviewed_at',
  'ehr_delivered_at',
  'hours_to_signature',
  'hours_signature_to_codes',
  'hours_signature_to_ehr',
  'hours_to_all_done',
  'overdue',
  'endotype',
] as const;

const pageSize = 5000;
const iso = (d: Date | null) => (d ? d.toISOString() : '');
const hours = (v: number | null) => (v === null ? '' : (Math.round(Number(v) * 100) / 100).toFixed(2));

/**
 * Every study of the range, one row each, oldest first, streamed in keyset pages through
 * csv-stringify; every text cell passes the product's one CSV rule (`neutraliseCell`). An open
 * interval is an empty cell. Returns the number of rows written.
 */
export async function writeTurnaroundCsv(db: DataSource, query: TurnaroundQuery, settings: TurnaroundSettings, out: Writable, now = new Date()): Promise<number> {
  const csv = stringify({
    header: true,
    columns: [...columns],
    ...csvExportOptions,
  });
  csv.pipe(out);
  // The key as text: microseconds survive (a Date would drop them and repeat a row).
  let after: [string, string] | null = null;
  let written = 0;
  const overdueBefore = new Date(now.getTime() - settings.signatureTargetHours * 3_600_000);
  for (;;) {
    const rows: Record<string, never>[] = await db.query(
      `SELECT s.accession, s.state, t.study_id, t.started_at, t.started_at::text AS started_key, t.start_basis, u.display_name AS physician,
              t.signed_at, t.coded_at, t.delivered_at, t.endotype, ${intervalColumns}
       FROM study_turnaround t JOIN study s ON s.id = t.study_id LEFT JOIN app_user u ON u.id = t.physician_id
       WHERE ${rangeCondition} ${after ? 'AND (t.started_at, t.study_id) > ($4::timestamptz, $5::uuid)' : ''}
       ORDER BY t.started_at, t.study_id LIMIT ${pageSize}`,
      [query.from, query.to, settings.timeZone, ...(after ?? [])],
    );
    for (const r of rows) {
      const started = r.started_at as Date;
      const record = [
        r.accession,
        r.state,
        iso(started),
        r.start_basis,
        r.physician ?? '',
        iso(r.signed_at),
        iso(r.coded_at),
        iso(r.delivered_at),
        hours(r.to_signature),
        hours(r.to_coded),
        hours(r.to_delivered),
        hours(r.to_done),
        r.signed_at === null && started < overdueBefore ? 'yes' : 'no',
        r.endotype ?? '',
      ];
      if (!csv.write(record)) await new Promise((resolve) => csv.once('drain', resolve));
    }
    written += rows.length;
    if (rows.length < pageSize) break;
    const last = rows[rows.length - 1];
    after = [last.started_key as string, last.study_id as string];
  }
  await new Promise<void>((resolve, reject) => {
    out.once('finish', resolve);
    out.once('error', reject);
    csv.end();
  });
  return written;
}
