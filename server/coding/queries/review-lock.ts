import type { EntityManager } from 'typeorm';
import { CodeSuggestionSet, CodingReview } from '../../db/entities/coding.entities';
import { RecordNotFoundError } from '../../errors';
import { NotCurrentSetError, ReviewCompletedError, SetSupersededError } from '../errors';

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
  if (review.currentSetId !== setId) {
    // Only a set this study had before is one an addendum replaced; any other id is not this study's.
    const older = await manager.exists(CodeSuggestionSet, { where: { id: setId, studyId } });
    throw older ? new SetSupersededError(review.currentSet!.versionNo) : new NotCurrentSetError();
  }
  if (review.status === 'coded') throw new ReviewCompletedError();
  return { status: review.status, setId: review.currentSetId };
}
