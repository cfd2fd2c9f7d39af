import { RecordNotFoundError } from '../../errors';
import type { Sql } from '../sql';

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
 * Locks a study's review for the rest of the transaction and checks that the coder acted on the
 * set in force and that the review is still open.
 */
export async function lockOpenReview(sql: Sql, studyId: string, setId: string): Promise<{ status: string; setId: string }> {
  const [row] = await sql(
    `SELECT r.status, r.current_set_id, s.version_no FROM coding_review r JOIN code_suggestion_set s ON s.id = r.current_set_id WHERE r.study_id = $1 FOR UPDATE OF r`,
    [studyId],
  );
  if (!row) throw new RecordNotFoundError('This study has no code suggestions yet.');
  if (row.current_set_id !== setId) throw new SetSupersededError(row.version_no);
  if (row.status === 'coded') throw new ReviewCompletedError();
  return { status: row.status, setId: row.current_set_id };
}
