import type { DataSource } from 'typeorm';
import { checkCodeLine, type CodeSystem } from '../../shared/coding';
import type { DecideCode, ReviewView } from '../../shared/coding/review';
import { recordAudit } from '../audit/audit';
import { CodeDecision, CodeLine } from '../db/entities/coding.entities';
import { InvalidRequestError, RecordNotFoundError } from '../errors';
import type { CodingActor } from './actor';
import { loadReview } from './queries/review';
import { lockOpenReview } from './queries/review-lock';
import { markInReview } from './review-status';

/**
 * Records a coder's decision on one line: accept it, edit it (code, units, modifiers — checked
 * against the line's system — with a reason) or reject it with a reason. The suggestion itself is
 * never changed; the decision is a new row and the newest one counts.
 */
export async function decideCode(dataSource: DataSource, studyId: string, input: DecideCode, actor: CodingActor): Promise<ReviewView> {
  return dataSource.transaction(async (manager) => {
    const review = await lockOpenReview(manager, studyId, input.setId);
    const line = await manager.findOne(CodeLine, { select: { id: true, system: true, code: true, units: true, modifiers: true }, where: { id: input.lineId, setId: review.setId } });
    if (!line) throw new RecordNotFoundError('No code line of this study has this id.');
    if (input.decision === 'edit') {
      const problems = checkCodeLine({ system: line.system as CodeSystem, code: input.code, units: input.units, modifiers: input.modifiers });
      if (problems.length) throw new InvalidRequestError('The edited code has fields to correct.', problems.map((p) => ({ pointer: `/${p.field}`, detail: p.message })));
    }
    const edit = input.decision === 'edit' ? input : null;
    await manager.insert(CodeDecision, {
      lineId: line.id,
      decision: input.decision,
      code: edit?.code ?? null,
      units: edit?.units ?? null,
      modifiers: edit?.modifiers ?? null,
      reason: 'reason' in input ? input.reason : null,
      decidedBy: actor.actorUserId,
      deciderName: actor.actorName,
    });
    await markInReview(manager, studyId, review.status);
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
    return loadReview(manager, studyId);
  });
}
