import type { DataSource, EntityManager } from 'typeorm';
import type { Role } from '../../shared/auth/permissions';
import { checkTransition, transitions, type StateChange } from '../../shared/study/state-machine';
import type { StudyState } from '../../shared/study/vocabulary';
import { recordAudit, type AuditActor } from '../audit/audit';
import { RecordNotFoundError } from '../errors';
import { loadStudy, writeSections } from '../studies/repository';
import { StaleVersionError } from '../studies/errors';
import type { StudyRecord } from '../../shared/study/schema';
import { TransitionRefusedError } from './errors';
import { latestVersion } from './sign-study';
import { lockStudy } from '../studies/lock-study';
import { Study } from '../db/entities/study.entity';

export type { StateChange } from '../../shared/study/state-machine';

export interface ChangeStateRequest {
  studyId: string;
  action: StateChange;
  studyVersion: number;
  reason?: string | null;
  role: Role | null;
  audit: AuditActor;
}

/**
 * Moves a study along the hand-off: ready for review, back to draft with a reason, an addendum opened
 * or discarded. Discarding an addendum puts the record back exactly as it was last signed.
 */
export async function changeStudyState(dataSource: DataSource, req: ChangeStateRequest): Promise<StudyRecord> {
  return dataSource.transaction(async (manager) => {
    const row = await lockStudy(manager, req.studyId);
    if (!row) throw new RecordNotFoundError('No study has this id.');
    const state = row.state as StudyState;
    const refusal = checkTransition(state, req.action, req.role, req.reason);
    if (refusal) throw new TransitionRefusedError(refusal, `“${transitions[req.action].label}” is not possible for a ${state} study${refusal === 'not-permitted' ? ' with your role' : ''}.`);
    if (row.version !== req.studyVersion) throw new StaleVersionError((await loadStudy(manager, req.studyId))!);
    let next: StudyState;
    if (req.action === 'discard-addendum') {
      const last = await latestVersion(manager, req.studyId);
      if (!last) throw new TransitionRefusedError('wrong-state', 'This study has no signed version to return to.');
      next = last.status === 'final' ? 'signed' : 'amended';
      await restoreSnapshot(manager, req.studyId, last.snapshot as StudyRecord);
    } else {
      next = transitions[req.action].to as StudyState;
    }
    // TypeORM adds `version = version + 1` and `updated_at = now()` (the study's version and update-date columns).
    await manager.update(Study, { id: req.studyId }, { state: next });
    await recordAudit(manager, {
      ...req.audit,
      action: req.action,
      entityType: 'study',
      entityId: req.studyId,
      outcome: 'success',
      detail: { from: state, to: next, ...(req.reason ? { reason: req.reason.slice(0, 500) } : {}) },
    });
    return (await loadStudy(manager, req.studyId))!;
  });
}

/** Writes the signed snapshot's sections back over the record (the addendum's edits are dropped). */
async function restoreSnapshot(manager: EntityManager, studyId: string, snapshot: StudyRecord): Promise<void> {
  await writeSections(manager, studyId, {
    details: snapshot.details,
    setup: snapshot.setup,
    vessels: snapshot.vessels,
    vasoreactivity: snapshot.vasoreactivity,
    findings: snapshot.findings,
  });
}
