import type { EntityManager } from 'typeorm';
import { CodingReview } from '../../db/entities/coding.entities';
import { RecordNotFoundError } from '../../errors';

export class SetSupersededError extends Error {
  constructor(versionNo: number) {
    super(`The report has been amended (version ${versionNo}) and the codes were suggested again. Reload the review.`);
  }
}

export class ReviewCompletedError extends Error {
  constructor() {
    super('This study has been coded; its codes change only when an addendum puts it back on the queue.');
  }
}

/**
 * Locks a study's review for the rest of the transaction (`FOR UPDATE OF` the review row only) and
 * checks that the coder acted on the set in force and that the review is still open.
 */
export async function lockOpenReview(manager: EntityManager, studyId: string, setId: string): Promise<{ status: CodingReview['status']; setId: string }> {
  const review = await manager
    .createQueryBuilder(CodingReview, 'r')
    .innerJoin('r.currentSet', 's')
    .select(['r.studyId', 'r.status', 'r.currentSetId', 's.id', 's.versionNo'])
    .where('r.studyId = :studyId', { studyId })
    .setLock('pessimistic_write', undefined, ['r'])
    .getOne();
  if (!review) throw new RecordNotFoundError('This study has no code suggestions yet.');
  if (review.currentSetId !== setId) throw new SetSupersededError(review.currentSet!.versionNo);
  if (review.status === 'coded') throw new ReviewCompletedError();
  return { status: review.status, setId: review.currentSetId };
}
