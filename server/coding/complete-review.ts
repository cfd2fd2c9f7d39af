import type { DataSource } from 'typeorm';
import type { ReviewView } from '../../shared/coding/review';
import { recordAudit } from '../audit/audit';
import { CodingReview } from '../db/entities/coding.entities';
import type { CodingActor } from './actor';
import { loadReview } from './queries/review';
import { lockOpenReview } from './queries/review-lock';
import { ReviewIncompleteError } from './errors';

/**
 * Completes the review: every suggested line has a decision and no blocking warning stands (the
 * encounter and the catheterization are recorded). Records who and when; the study leaves the queue.
 */
export async function completeReview(dataSource: DataSource, studyId: string, setId: string, actor: CodingActor): Promise<ReviewView> {
  return dataSource.transaction(async (manager) => {
    await lockOpenReview(manager, studyId, setId);
    const before = await loadReview(manager, studyId);
    if (before.blockers.length) throw new ReviewIncompleteError(before.blockers);
    await manager.update(
      CodingReview,
      { studyId },
      { status: 'coded', completedBy: actor.actorUserId, completerName: actor.actorName, completedAt: () => 'now()', updatedAt: () => 'now()' },
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
    return loadReview(manager, studyId);
  });
}
