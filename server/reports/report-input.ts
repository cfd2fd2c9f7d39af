import type { EntityManager } from 'typeorm';
import { analyzeStudy, thresholdsSchema, type Thresholds } from '../../shared/physiology';
import { resolveThresholds } from '../../shared/physiology/thresholds';
import type { ThresholdsChoice } from '../../shared/report/thresholds-basis';
import type { StudyRecord } from '../../shared/study/schema';
import { toPhysiologyInput } from '../../shared/study/to-physiology';
import { ReportVersion } from '../db/entities/report-version.entity';
import { ThresholdSet } from '../db/entities/measurement.entities';
import { User } from '../db/entities/user.entity';
import type { AmendedVersion, ReportInput, ReportStudy } from '../report-document';
import type { ThresholdsBasisInfo } from '../../shared/report/thresholds-basis';
import { labSettings } from '../settings/queries/lab-settings';
import { thresholdsInForce, type ThresholdsInForce } from '../settings/queries/thresholds';

/** The parts of a study record a report is built from (and that a signed version keeps). */
function reportStudyOf(record: StudyRecord): ReportStudy {
  const { id, accession, patient, details, setup, vessels, vasoreactivity, findings, coding } = record;
  // The whole record as signed: delivery builds the Encounter from the coding section's patient class.
  return { id, accession, patient, details, setup, vessels, vasoreactivity, findings, coding };
}

export type { ThresholdsChoice };

export type ReportInputWithBasis = Omit<ReportInput, 'signature'> & { thresholdsBasis: ThresholdsBasisInfo };

/** The version an addendum amends, as far as the choice of thresholds needs it. */
export interface AmendedThresholds {
  versionNo: number;
  thresholds: unknown;
  thresholdSetId: number | null;
  /** When the set it used took effect (null for the published defaults or a set no longer found). */
  setEffectiveFrom: Date | null;
}

/**
 * The choice itself, from what the caller read: for an addendum (`amended` given) its own thresholds
 * when `choice` is `original` and they still parse, else those in force.
 */
export function chooseThresholds(amended: AmendedThresholds | null, inForce: () => ThresholdsInForce, choice: ThresholdsChoice): { values: Thresholds; basis: ThresholdsBasisInfo } {
  if (amended && choice === 'original') {
    const parsed = thresholdsSchema.safeParse(amended.thresholds);
    if (parsed.success) {
      return {
        values: resolveThresholds(parsed.data as Partial<Thresholds>),
        basis: { basis: 'original', setId: amended.thresholdSetId, effectiveFrom: amended.setEffectiveFrom?.toISOString() ?? null, amendedVersion: amended.versionNo },
      };
    }
  }
  const set = inForce();
  return {
    values: set.values,
    basis: { basis: amended ? 'current' : 'in-force', setId: set.setId, effectiveFrom: set.effectiveFrom, amendedVersion: amended?.versionNo ?? null },
  };
}

/** The thresholds that judge a report signed at `at`: those in force, or an addendum's choice. */
export async function thresholdsFor(
  manager: EntityManager,
  record: Pick<StudyRecord, 'id' | 'state'>,
  at: Date,
  choice: ThresholdsChoice = 'original',
): Promise<{ values: Thresholds; basis: ThresholdsBasisInfo }> {
  const amended = record.state === 'amending' ? await manager.findOne(ReportVersion, { where: { studyId: record.id }, order: { versionNo: 'DESC' }, select: { versionNo: true, thresholds: true, thresholdSetId: true } }) : null;
  let amendedThresholds: AmendedThresholds | null = null;
  if (amended) {
    const original = choice === 'original' && thresholdsSchema.safeParse(amended.thresholds).success;
    const set = original && amended.thresholdSetId !== null ? await manager.findOne(ThresholdSet, { where: { id: amended.thresholdSetId }, select: { id: true, effectiveFrom: true } }) : null;
    amendedThresholds = { versionNo: amended.versionNo, thresholds: amended.thresholds, thresholdSetId: amended.thresholdSetId, setEffectiveFrom: set?.effectiveFrom ?? null };
  }
  const inForce = amendedThresholds && choice === 'original' && thresholdsSchema.safeParse(amendedThresholds.thresholds).success ? null : await thresholdsInForce(manager, at);
  return chooseThresholds(amendedThresholds, () => inForce!, choice);
}

/**
 * Everything the report needs: the record, its analysis with the thresholds that judge it (those in
 * force at `at`, or an addendum's choice), names, and the lab's template version and time zone.
 */
export async function reportInputFor(
  manager: EntityManager,
  record: StudyRecord,
  hospital: { name: string; lab: string } | null,
  at = new Date(),
  choice: ThresholdsChoice = 'original',
): Promise<ReportInputWithBasis> {
  const thresholds = await thresholdsFor(manager, record, at, choice);
  const settings = await labSettings(manager);
  const operator = record.details.operatorId ? await manager.findOne(User, { where: { id: record.details.operatorId }, select: { id: true, displayName: true } }) : null;
  return reportInputOf(record, hospital, thresholds, settings, operator?.displayName ?? null);
}

/** The same, from what the caller has read already (no database work): the analysis runs here. */
export function reportInputOf(
  record: StudyRecord,
  hospital: { name: string; lab: string } | null,
  thresholds: { values: Thresholds; basis: ThresholdsBasisInfo },
  settings: { templateVersion: string; timeZone: string },
  operatorName: string | null,
): ReportInputWithBasis {
  const analysis = analyzeStudy({ ...toPhysiologyInput(record), thresholds: thresholds.values });
  return {
    study: reportStudyOf(record),
    analysis,
    thresholds: thresholds.values,
    thresholdsBasis: thresholds.basis,
    people: { operator: operatorName },
    hospital,
    templateVersion: settings.templateVersion,
    timeZone: settings.timeZone,
  };
}

/** A signed version as an addendum names it (`ReportInput.amends`). */
export function toAmendedVersion(v: Pick<ReportVersion, 'versionNo' | 'signedAt' | 'signerName' | 'contentSha256' | 'snapshot'>): AmendedVersion {
  return { versionNo: v.versionNo, signedAt: v.signedAt.toISOString(), signedBy: v.signerName, fingerprint: v.contentSha256.trim(), record: v.snapshot as Record<string, unknown> };
}

/** The newest signed version of a study, which an open addendum supersedes; null when none is signed. */
export async function amendedVersionOf(manager: EntityManager, studyId: string): Promise<AmendedVersion | null> {
  const v = await manager.findOne(ReportVersion, {
    where: { studyId },
    order: { versionNo: 'DESC' },
    select: { id: true, versionNo: true, signedAt: true, signerName: true, contentSha256: true, snapshot: true },
  });
  return v ? toAmendedVersion(v) : null;
}
