import type { DataSource } from 'typeorm';
import type { AwaitingList, AwaitingSignature } from '../../../shared/study/awaiting-signature';
import type { WorklistItem } from '../../../shared/study/worklist';
import { waitingSince } from '../../../shared/turnaround/overdue';
import { labSettings } from '../../settings/queries/lab-settings';
import { summaryJson, summarySelect } from '../worklist';

/** At most this many rows per list; `total` says how many there are. */
const awaitingListLimit = 100;

/**
 * The studies awaiting signature, oldest first by the turnaround clock (`study_turnaround.started_at`:
 * procedure end, else start, else when the record was opened — the chief's lists use the same one):
 * those `operatorId` operated, and all of them.
 */
export async function listAwaitingSignature(dataSource: DataSource, operatorId: string, now = new Date()): Promise<AwaitingSignature> {
  // The lab's own signature target (admin settings), the same the turnaround page judges by.
  const { signatureTargetHours: targetHours } = await labSettings(dataSource);
  const list = async (mineOnly: boolean): Promise<AwaitingList> => {
    // SQL: the worklist's own summary select and item (server/studies/worklist.ts) with a window count, one statement per list.
    const rows: Array<{ item: WorklistItem; waiting_since: Date; total: string }> = await dataSource.query(
      `SELECT ${summaryJson('q')} AS item, t.started_at AS waiting_since, count(*) OVER () AS total
       FROM (${summarySelect} WHERE s.state = 'awaiting-signature'${mineOnly ? ' AND s.operator_id = $2' : ''}) q
       JOIN study_turnaround t ON t.study_id = q.id
       ORDER BY t.started_at ASC, q.id
       LIMIT $1`,
      mineOnly ? [awaitingListLimit, operatorId] : [awaitingListLimit],
    );
    return {
      total: rows.length ? Number(rows[0].total) : 0,
      items: rows.map((row) => {
        const since = row.waiting_since;
        return { ...row.item, waitingSince: since.toISOString(), ...waitingSince(since, now, targetHours) };
      }),
    };
  };
  const [mine, all] = await Promise.all([list(true), list(false)]);
  return { targetHours, limit: awaitingListLimit, mine, all };
}
