import type { EntityManager } from 'typeorm';
import type { CodeSystem, CodingWarning } from '../../../shared/coding';
import { compareCodes, inputChanges, type FinalCode, type ReviewLine, type ReviewStatus, type ReviewView } from '../../../shared/coding/review';
import { CodeDecision, CodeLine, CodeSuggestionSet, CodingReview } from '../../db/entities/coding.entities';
import { Study } from '../../db/entities/study.entity';
import { RecordNotFoundError } from '../../errors';

/** A set's lines, each with its newest decision and the code it settles to. */
export async function loadLines(manager: EntityManager, setId: string): Promise<ReviewLine[]> {
  const lines = await manager.find(CodeLine, {
    select: { id: true, origin: true, system: true, code: true, units: true, modifiers: true, ruleId: true, rationale: true, description: true, addOn: true, codeSet: true, source: true },
    where: { setId },
    order: { position: 'ASC' },
  });
  // The newest decision of each line (decisions are append-only; the highest id is the newest).
  const decisions = lines.length
    ? await manager
        .createQueryBuilder(CodeDecision, 'd')
        .distinctOn(['d.lineId'])
        .select(['d.id', 'd.lineId', 'd.decision', 'd.code', 'd.units', 'd.modifiers', 'd.reason', 'd.deciderName', 'd.decidedAt'])
        .where('d.lineId IN (:...lineIds)', { lineIds: lines.map((l) => l.id) })
        .orderBy('d.lineId')
        .addOrderBy('d.id', 'DESC')
        .getMany()
    : [];
  const newest = new Map(decisions.map((d) => [d.lineId, d]));
  return lines.map((l) => {
    const d = newest.get(l.id);
    const system = l.system as CodeSystem;
    const original: FinalCode = { system, code: l.code, units: l.units, modifiers: l.modifiers };
    let final: FinalCode | null = null;
    if (d?.decision === 'accept' || d?.decision === 'add') final = original;
    else if (d?.decision === 'edit') final = { system, code: d.code!, units: d.units!, modifiers: d.modifiers! };
    return {
      id: l.id,
      origin: l.origin,
      ...original,
      ruleId: l.ruleId,
      rationale: l.rationale,
      description: l.description,
      addOn: l.addOn,
      codeSet: l.codeSet,
      source: l.source,
      decision: d ? { decision: d.decision, reason: d.reason, by: d.deciderName, at: d.decidedAt.toISOString() } : null,
      final,
    };
  });
}

/** Why the review cannot be completed yet: blocking warnings and lines without a decision. */
function blockersOf(warnings: CodingWarning[], lines: ReviewLine[]): string[] {
  const out = warnings.filter((w) => w.blocking).map((w) => w.message);
  const undecided = lines.filter((l) => !l.decision).length;
  if (undecided) out.push(`${undecided} suggested code${undecided === 1 ? ' has' : 's have'} no decision yet: accept, edit or reject each.`);
  return out;
}

/** A study's code review: the set in force, its lines and decisions, the signed report, what changed. */
export async function loadReview(manager: EntityManager, studyId: string): Promise<ReviewView> {
  const review = await manager
    .createQueryBuilder(CodingReview, 'r')
    .innerJoin('r.currentSet', 'cs')
    .innerJoin('cs.reportVersion', 'rv')
    .innerJoin('r.study', 's')
    .innerJoin('s.patient', 'p')
    .leftJoin('s.operator', 'u')
    .select(['r.studyId', 'r.status', 'r.completerName', 'r.completedAt'])
    .addSelect(['cs.id', 'cs.versionNo', 'cs.createdAt', 'cs.warnings', 'cs.codeSets', 'cs.caution', 'cs.failure', 'cs.input', 'cs.previousSetId'])
    .addSelect(['rv.id', 'rv.versionNo', 'rv.status', 'rv.signedAt', 'rv.signerName', 'rv.narrativeText', 'rv.reason'])
    .addSelect(['s.id', 's.accession', 's.state', 's.procedureStartedAt'])
    .addSelect(['p.id', 'p.mrn', 'p.familyName', 'p.givenName', 'p.birthDate'])
    .addSelect(['u.id', 'u.displayName'])
    .where('r.studyId = :studyId', { studyId })
    .getOne();
  if (!review) {
    const study = await manager.exists(Study, { where: { id: studyId } });
    throw new RecordNotFoundError(study ? 'This study has no code suggestions yet: they are made when its report is signed.' : 'No study has this id.');
  }
  const set = review.currentSet!;
  const version = set.reportVersion!;
  const study = review.study!;
  const patient = study.patient!;
  const lines = await loadLines(manager, set.id);
  const warnings = set.warnings as CodingWarning[];

  let changes: ReviewView['changes'] = null;
  if (set.previousSetId) {
    const previous = (await manager.findOne(CodeSuggestionSet, { select: { id: true, versionNo: true, input: true }, where: { id: set.previousSetId } }))!;
    const previousFinal = (await loadLines(manager, set.previousSetId)).flatMap((l) => (l.final ? [l.final] : []));
    const suggested = lines.filter((l) => l.origin === 'suggested').map(({ system, code, units, modifiers }) => ({ system, code, units, modifiers }));
    changes = {
      previousVersionNo: previous.versionNo,
      inputChanges: inputChanges(previous.input as Record<string, unknown> | null, set.input as Record<string, unknown> | null),
      codes: compareCodes(previousFinal, suggested),
    };
  }

  return {
    study: {
      id: study.id,
      accession: study.accession,
      state: study.state as ReviewView['study']['state'],
      patient: { mrn: patient.mrn, familyName: patient.familyName, givenName: patient.givenName, birthDate: patient.birthDate },
      operatorName: study.operator?.displayName ?? null,
      procedureStartedAt: study.procedureStartedAt?.toISOString() ?? null,
    },
    status: review.status as ReviewStatus,
    completedBy: review.completerName,
    completedAt: review.completedAt?.toISOString() ?? null,
    set: {
      id: set.id,
      versionNo: set.versionNo,
      createdAt: set.createdAt.toISOString(),
      warnings,
      codeSets: set.codeSets as ReviewView['set']['codeSets'],
      caution: set.caution,
      failure: set.failure,
    },
    report: {
      versionNo: version.versionNo,
      status: version.status,
      signedAt: version.signedAt.toISOString(),
      signerName: version.signerName,
      narrativeText: version.narrativeText,
      reason: version.reason,
    },
    lines,
    changes,
    blockers: review.status === 'coded' ? [] : blockersOf(warnings, lines),
  };
}
