import type { EntityManager } from 'typeorm';
import { CodingReview } from '../db/entities/coding.entities';

/** The first decision on a study's set moves its review from "to code" to "in review". */
export async function markInReview(manager: EntityManager, studyId: string, status: CodingReview['status']): Promise<void> {
  if (status === 'to-code') await manager.update(CodingReview, { studyId }, { status: 'in-review', updatedAt: () => 'now()' });
}
