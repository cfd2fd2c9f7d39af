import type { DataSource } from 'typeorm';
import { checkCodeLine, type CodeSystem } from '../../shared/coding';
import type { DecideCode, ReviewView } from '../../shared/coding/review';
import { recordAudit } from '../audit/audit';
import { InvalidRequestError, RecordNotFoundError } from '../errors';
import type { CodingActor } from './actor';
import { loadReview } from './queries/review';
import { lockOpenReview } from './queries/review-lock';
import { sqlOf } from './sql';

/**
 * Records a coder's decision on one line: accept it, edit it (code, units, modifiers — checked
 * against the line's system — with a reason) or reject it with a reason. The suggestion itself is
 * never changed; the decision is a new row and the newest one counts.
 */
export async function decideCode(dataSource: DataSource, studyId: string, input: DecideCode, actor: CodingActor): Promise<ReviewView> {
  return dataSource.transaction(async (manager) => {
    const sql = sqlOf(manager);
    const review = await lockOpenReview(sql, studyId, input.setId);
    const [line] = await sql(`SELECT id, system, code, units, modifiers FROM code_line WHERE id = $1 AND set_id = $2`, [input.lineId, review.setId]);
    if (!line) throw new RecordNotFoundError('No code line of this study has this id.');
    if (input.decision === 'edit') {
      const problems = checkCodeLine({ system: line.system as CodeSystem, code: input.code, units: input.units, modifiers: input.modifiers });
      if (problems.length) throw new InvalidRequestError('The edited code has fields to correct.', problems.map((p) => ({ pointer: `/${p.field}`, detail: p.message })));
    }
    const edit = input.decision === 'edit' ? input : null;
    await sql(
      `INSERT INTO code_decision (line_id, decision, code, units, modifiers, reason, decided_by, decider_name) VALUES ($1, $2, $3, $4, $5, $6, $7, $8)`,
      [line.id, input.decision, edit?.code ?? null, edit?.units ?? null, edit?.modifiers ?? null, 'reason' in input ? input.reason : null, actor.actorUserId, actor.actorName],
    );
    if (review.status === 'to-code') await sql(`UPDATE coding_review SET status = 'in-review', updated_at = now() WHERE study_id = $1`, [studyId]);
    await recordAudit(manager, {
      ...actor,
      action: 'update',
      entityType: 'study-coding',
      entityId: studyId,
      outcome: 'success',
      detail: {
        decision: input.decision,
        lineId: line.id,
        suggested: { system: line.system, code: line.code, units: line.units, modifiers: line.modifiers },
        ...(edit ? { edited: { code: edit.code, units: edit.units, modifiers: edit.modifiers } } : {}),
        ...('reason' in input ? { reason: input.reason } : {}),
      },
    });
    return loadReview(sql, studyId);
  });
}
