import type { Bundle } from 'fhir/r4';
import { z } from 'zod';
import { IDENTIFIER_SYSTEMS } from '../../fhir/codes';
import { reportBundleInputSchema, toReportBundle, type ReportBundleInput } from '../../fhir/report-bundle';
import { patientClasses } from '../../shared/coding/schema';
import { coronarySegments, sexes } from '../../shared/study/vocabulary';
import type { ReportVersionStatus } from '../../shared/report/version-status';

/**
 * From a stored, signed report version to the FHIR transaction Bundle the EHR receives. Everything
 * comes from the version as it was signed (its snapshot of the study record, its analysis, its
 * thresholds and PDF), so a resend months later sends the same bytes. Pure: the caller reads the rows.
 */

/** The fields of a `report_version` row the bundle needs. */
export interface StoredReportVersion {
  id: string;
  studyId: string;
  versionNo: number;
  status: ReportVersionStatus;
  snapshot: unknown;
  analysis: unknown;
  thresholds: unknown;
  pdf: Buffer;
  pdfSha256: string;
  signerName: string;
  signedAt: Date;
}

export interface BundleContext {
  /** The version this one supersedes (its number), for an amended report. */
  previousVersionNo?: number;
  /** The display name of the physician who did the procedure (the study's operator). */
  operatorName?: string | null;
  /** The hospital's identifier systems. */
  identifierSystems: { patient: string; encounter: string; accession: string };
}

const optionalText = z.string().trim().min(1).nullable().optional().catch(null);

/** The parts of the signed study record the bundle reads; other fields are ignored. */
const snapshotSchema = z.object({
  id: z.string().min(1),
  accession: z.string().min(1),
  patient: z.object({
    mrn: z.string().min(1),
    familyName: z.string().min(1),
    givenName: z.string().min(1),
    birthDate: z.iso.date(),
    sex: z.enum(sexes),
  }),
  details: z.object({
    encounter: optionalText,
    procedureStartedAt: z.iso.datetime({ offset: true, error: 'The signed record has no procedure start.' }),
    procedureEndedAt: z.iso.datetime({ offset: true }).nullable().optional().catch(null),
    operatorId: z.string().nullable().optional(),
    patientClass: z.enum(patientClasses).nullable().optional().catch(null),
    anginaPresent: z.boolean().nullable().optional().catch(null),
  }),
  vessels: z.array(z.object({ id: z.string(), segment: z.string().nullable().optional() })).optional().default([]),
  findings: z.object({ impression: optionalText }).optional(),
  coding: z.object({ patientClass: z.enum(patientClasses).nullable().optional().catch(null) }).optional().catch(undefined),
});

const analysisSchema = z.object({ vessels: z.array(z.object({ id: z.string() }).passthrough()) }).passthrough();

/** Thrown when a stored version cannot become a bundle; the message names fields, never their values. */
export class BundleBuildError extends Error {
  constructor(readonly problems: string[]) {
    super(`The signed report could not be made into a FHIR bundle: ${problems.join('; ')}`);
    this.name = 'BundleBuildError';
  }
}

const problemsOf = (error: z.ZodError, prefix: string) => error.issues.map((i) => `${[prefix, ...i.path].join('.')}: ${i.message}`);

/** When no impression was written, the conclusion points to the signed report itself. */
const NO_IMPRESSION_CONCLUSION = 'See the signed report (attached PDF).';

export function reportBundleInputOf(version: StoredReportVersion, context: BundleContext): ReportBundleInput {
  const snap = snapshotSchema.safeParse(version.snapshot);
  if (!snap.success) throw new BundleBuildError(problemsOf(snap.error, 'snapshot'));
  const analysis = analysisSchema.safeParse(version.analysis);
  if (!analysis.success) throw new BundleBuildError(problemsOf(analysis.error, 'analysis'));
  const s = snap.data;
  const systems = context.identifierSystems;

  // The segment as text beside the vessel (the bundle codes the artery; the segment travels as text).
  const segmentOf = new Map(s.vessels.map((v) => [v.id, coronarySegments.find((c) => c.code === v.segment)?.label]));
  const vessels = analysis.data.vessels.map((v) => {
    const segment = segmentOf.get(v.id);
    return segment ? { ...v, segment } : v;
  });

  const patientClass = s.details.patientClass ?? s.coding?.patientClass ?? null;
  const signer = { name: version.signerName };
  if (version.status === 'amended' && context.previousVersionNo === undefined) {
    throw new BundleBuildError(['report.previousVersion: an amended version names the version it supersedes']);
  }
  return {
    bundleType: 'transaction',
    report: {
      // One report per study: every version updates the same DiagnosticReport.
      id: version.studyId,
      version: version.versionNo,
      status: version.status,
      ...(version.status === 'amended' ? { previousVersion: context.previousVersionNo } : {}),
      signedAt: version.signedAt.toISOString(),
      signer,
    },
    patient: {
      identifiers: [{ system: systems.patient, value: s.patient.mrn }],
      family: s.patient.familyName,
      given: [s.patient.givenName],
      birthDate: s.patient.birthDate,
      sex: s.patient.sex,
    },
    // Encounter.class is required (FHIR R4 Encounter.class 1..1): without a recorded patient class the
    // encounter is not sent rather than guessed.
    ...(s.details.encounter && patientClass ? { encounter: { identifier: { system: systems.encounter, value: s.details.encounter }, class: patientClass } } : {}),
    accession: { system: systems.accession, value: s.accession },
    procedure: { start: s.details.procedureStartedAt, ...(s.details.procedureEndedAt ? { end: s.details.procedureEndedAt } : {}) },
    performer: { name: context.operatorName ?? version.signerName },
    analysis: { ...(analysis.data as object), vessels, ...(typeof s.details.anginaPresent === 'boolean' ? { angina: s.details.anginaPresent } : {}) } as ReportBundleInput['analysis'],
    thresholds: version.thresholds as ReportBundleInput['thresholds'],
    conclusion: s.findings?.impression ?? NO_IMPRESSION_CONCLUSION,
    // The default title names the version and, for an addendum, the version it amends.
    pdf: { base64: version.pdf.toString('base64'), sha256: version.pdfSha256.trim() },
  };
}

/** The transaction Bundle for a stored version; a `BundleBuildError` when it cannot be built. */
export function buildReportBundle(version: StoredReportVersion, context: BundleContext): Bundle {
  const input = reportBundleInputOf(version, context);
  const parsed = reportBundleInputSchema.safeParse(input);
  if (!parsed.success) throw new BundleBuildError(problemsOf(parsed.error, 'bundle'));
  return toReportBundle(input);
}

/** Bundle.identifier of a version, as system|value (what the EHR recognises a resend by). */
export const bundleIdentifierOf = (studyId: string, versionNo: number) => `${IDENTIFIER_SYSTEMS.bundle}|${studyId}/v${versionNo}`;
