import type { DataSource } from 'typeorm';
import type { AddCode, ReviewView } from '../../shared/coding/review';
import { recordAudit } from '../audit/audit';
import type { CodingActor } from './actor';
import { loadReview } from './queries/review';
import { lockOpenReview } from './queries/review-lock';
import { sqlOf } from './sql';

/** Adds a code the engine did not suggest (any system), with the coder's reason. */
export async function addCode(dataSource: DataSource, studyId: string, input: AddCode, actor: CodingActor): Promise<ReviewView> {
  return dataSource.transaction(async (manager) => {
    const sql = sqlOf(manager);
    const review = await lockOpenReview(sql, studyId, input.setId);
    const [{ next }] = await sql(`SELECT coalesce(max(position) + 1, 0)::int AS next FROM code_line WHERE set_id = $1`, [review.setId]);
    const [line] = await sql(
      `INSERT INTO code_line (set_id, position, origin, system, code, units, modifiers, added_by) VALUES ($1, $2, 'added', $3, $4, $5, $6, $7) RETURNING id`,
      [review.setId, next, input.system, input.code, input.units, input.modifiers, actor.actorUserId],
    );
    await sql(`INSERT INTO code_decision (line_id, decision, reason, decided_by, decider_name) VALUES ($1, 'add', $2, $3, $4)`, [line.id, input.reason, actor.actorUserId, actor.actorName]);
    if (review.status === 'to-code') await sql(`UPDATE coding_review SET status = 'in-review', updated_at = now() WHERE study_id = $1`, [studyId]);
    await recordAudit(manager, {
      ...actor,
      action: 'create',
      entityType: 'study-coding',
      entityId: studyId,
      outcome: 'success',
      detail: { decision: 'add', lineId: line.id, added: { system: input.system, code: input.code, units: input.units, modifiers: input.modifiers }, reason: input.reason },
    });
    return loadReview(sql, studyId);
  });
}
