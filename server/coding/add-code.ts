import type { DataSource } from 'typeorm';
import type { AddCode, ReviewView } from '../../shared/coding/review';
import { recordAudit } from '../audit/audit';
import { CodeDecision, CodeLine } from '../db/entities/coding.entities';
import type { CodingActor } from './actor';
import { loadReview } from './queries/review';
import { lockOpenReview } from './queries/review-lock';
import { markInReview } from './review-status';

/** Adds a code the engine did not suggest (any system), with the coder's reason. */
export async function addCode(dataSource: DataSource, studyId: string, input: AddCode, actor: CodingActor): Promise<ReviewView> {
  return dataSource.transaction(async (manager) => {
    const review = await lockOpenReview(manager, studyId, input.setId);
    const last = await manager.maximum(CodeLine, 'position', { setId: review.setId });
    const added = await manager.insert(CodeLine, {
      setId: review.setId,
      position: last === null ? 0 : last + 1,
      origin: 'added',
      system: input.system,
      code: input.code,
      units: input.units,
      modifiers: input.modifiers,
      addedBy: actor.actorUserId,
    });
    const lineId = (added.identifiers[0] as Pick<CodeLine, 'id'>).id;
    await manager.insert(CodeDecision, { lineId, decision: 'add', reason: input.reason, decidedBy: actor.actorUserId, deciderName: actor.actorName });
    await markInReview(manager, studyId, review.status);
    await recordAudit(manager, {
      ...actor,
      action: 'create',
      entityType: 'study-coding',
      entityId: studyId,
      outcome: 'success',
      detail: { decision: 'add', lineId, added: { system: input.system, code: input.code, units: input.units, modifiers: input.modifiers }, reason: input.reason },
    });
    return loadReview(manager, studyId);
  });
}
