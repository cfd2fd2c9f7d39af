import type { Writable } from 'node:stream';
import type { DataSource } from 'typeorm';
import type { TurnaroundFigures } from '../../shared/turnaround/figures';
import type { TurnaroundQuery } from '../../shared/turnaround/query';
import type { UnsignedList } from '../../shared/turnaround/unsigned';
import { recordAudit, type AuditActor } from '../audit/audit';
import { labSettings } from '../settings/queries/lab-settings';
import { awaitingSignature } from './queries/awaiting-signature';
import { writeTurnaroundCsv } from './queries/turnaround-csv';
import { turnaroundFigures } from './queries/figures';

/** The figures of a range in the lab's zone; the request is recorded by the statement that counts the range. */
export async function readTurnaroundFigures(dataSource: DataSource, query: TurnaroundQuery, actor: AuditActor): Promise<TurnaroundFigures> {
  const settings = await labSettings(dataSource);
  return turnaroundFigures(dataSource, query, settings, new Date(), {
    ...actor,
    action: 'search',
    entityType: 'study',
    outcome: 'success',
    detail: { view: 'turnaround-figures', from: query.from, to: query.to },
  });
}

/** The unsigned studies against the lab's target, the read recorded with the studies shown. */
export async function readUnsignedStudies(dataSource: DataSource, actor: AuditActor): Promise<UnsignedList> {
  const waiting = await awaitingSignature(dataSource, await labSettings(dataSource));
  await recordAudit(dataSource, { ...actor, action: 'search', entityType: 'study', outcome: 'success', detail: { view: 'awaiting-signature', returned: waiting.items.length, studyIds: waiting.items.map((s) => s.id) } });
  return waiting;
}

/** The range's studies as CSV into `out`, the export recorded first. `start` runs before the first byte (headers). */
export async function exportTurnaround(dataSource: DataSource, query: TurnaroundQuery, actor: AuditActor, out: Writable, start: () => void): Promise<void> {
  const settings = await labSettings(dataSource);
  await recordAudit(dataSource, { ...actor, action: 'export', entityType: 'study', outcome: 'success', detail: { view: 'turnaround', from: query.from, to: query.to } });
  start();
  await writeTurnaroundCsv(dataSource, query, settings, out);
}
