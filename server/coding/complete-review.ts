import type { DataSource } from 'typeorm';
import type { ReviewView } from '../../shared/coding/review';
import { recordAudit } from '../audit/audit';
import type { CodingActor } from './actor';
import { loadReview } from './queries/review';
import { lockOpenReview } from './queries/review-lock';
import { sqlOf } from './sql';

export class ReviewIncompleteError extends Error {
  constructor(public readonly blockers: string[]) {
    super(blockers.join(' '));
  }
}

/**
 * Completes the review: every suggested line has a decision and no blocking warning stands (the
 * encounter and the catheterization are recorded). Records who and when; the study leaves the queue.
 */
export async function completeReview(dataSource: DataSource, studyId: string, setId: string, actor: CodingActor): Promise<ReviewView> {
  return dataSource.transaction(async (manager) => {
    const sql = sqlOf(manager);
    await lockOpenReview(sql, studyId, setId);
    const before = await loadReview(sql, studyId);
    if (before.blockers.length) throw new ReviewIncompleteError(before.blockers);
    await sql(
      `UPDATE coding_review SET status = 'coded', completed_by = $2, completer_name = $3, completed_at = now(), updated_at = now() WHERE study_id = $1`,
      [studyId, actor.actorUserId, actor.actorName],
    );
    const codes = before.lines.flatMap((l) => (l.final ? [l.final] : []));
    await recordAudit(manager, {
      ...actor,
      action: 'update',
      entityType: 'study-coding',
      entityId: studyId,
      outcome: 'success',
      detail: { completed: true, setId, versionNo: before.set.versionNo, codes: codes.map((c) => `${c.system} ${c.code}${c.modifiers.length ? `-${c.modifiers.join('-')}` : ''} x${c.units}`) },
    });
    return loadReview(sql, studyId);
  });
}
