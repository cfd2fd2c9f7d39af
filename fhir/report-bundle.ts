import { createHash } from 'node:crypto';
import type {
  Attachment,
  Bundle,
  BundleEntry,
  CodeableConcept,
  Coding,
  DiagnosticReport,
  Encounter,
  Identifier,
  Observation,
  ObservationComponent,
  ObservationReferenceRange,
  Patient,
  Quantity,
  Reference,
} from 'fhir/r4';
import { z } from 'zod';
import { displayDecimals, roundForDisplay, roundHalfAway, type QuantityKind } from '../shared/physiology/precision';
import { nhprKinds, vesselCodes, type NhprKind } from '../shared/physiology/schema';
import { cutOffKind, cutOffRule, resolveThresholds, thresholdsSchema, type CutOffRule, type IndexCutOffKey, type Thresholds } from '../shared/physiology/thresholds';
import { endotypes, flags, imrMethods, vasoreactivityOutcomes, type Flag, type ImrMethod } from '../shared/physiology/types';
import { reportVersionStatuses } from '../shared/report/version-status';
import { patientClasses } from '../shared/coding/schema';
import { sexes } from '../shared/study/vocabulary';
import { vesselLongName } from '../shared/physiology/vessels';
import { endotypeName } from '../shared/physiology/labels';
import {
  IDENTIFIER_SYSTEMS,
  UCUM,
  US_CORE_DIAGNOSTIC_REPORT_NOTE,
  acetylcholineResultConcept,
  categoryCardiacCath,
  categoryCardiology,
  categoryProcedure,
  codeCardiacCathStudy,
  dicomCfr,
  encounterClass,
  endotypeConcept,
  interpretation,
  localCoding,
  localConcepts,
  loincPercentStenosis,
  snomedFfr,
  SNOMED,
  vesselBodySite,
  type LocalConceptKey,
} from './codes';
import { urnUuid, uuidV5 } from './uuid';

// ---------------------------------------------------------------------------------------------
// Input
// ---------------------------------------------------------------------------------------------

const identifierSchema = z.strictObject({
  system: z.string().min(1, { error: 'An identifier needs its system (a URI).' }),
  value: z.string().min(1, { error: 'An identifier needs a value.' }),
});

const dateTime = z.iso.datetime({ offset: true, error: 'Must be a date and time with its offset (ISO 8601).' });

const personSchema = z.strictObject({
  name: z.string().min(1),
  /** e.g. the national provider identifier; without it the person is named by display only. */
  identifier: identifierSchema.optional(),
});

const flagSchema = z.enum(flags);
const finite = z.number();

/**
 * One vessel of the physiology analysis (`VesselResult` from shared/physiology): the fields the
 * bundle reads. Other fields of a VesselResult are accepted and ignored.
 */
const vesselSchema = z.object({
  id: z.string().min(1),
  vessel: z.enum(vesselCodes),
  /** The segment or branch as written in the study (e.g. "proximal", "first diagonal"). */
  segment: z.string().min(1).optional(),
  ffr: finite.optional(),
  ffrFlag: flagSchema.optional(),
  ffrSource: z.enum(['pressures', 'entered']).optional(),
  ffrGreyZone: z.boolean().optional(),
  restingPdPa: finite.optional(),
  restingPdPaFlag: flagSchema.optional(),
  nhpr: finite.optional(),
  nhprKind: z.enum(nhprKinds).optional(),
  nhprFlag: flagSchema.optional(),
  cfr: finite.optional(),
  cfrFlag: flagSchema.optional(),
  imr: finite.optional(),
  imrFlag: flagSchema.optional(),
  imrUncorrected: finite.optional(),
  imrMethod: z.enum(imrMethods).optional(),
  rrr: finite.optional(),
  rrrFlag: flagSchema.optional(),
  mrr: finite.optional(),
  mrrFlag: flagSchema.optional(),
  visualStenosisPct: finite.optional(),
});

const analysisSchema = z.object({
  vessels: z.array(vesselSchema),
  vasoreactivity: z
    .object({ result: z.enum(vasoreactivityOutcomes) })
    .optional(),
  endotype: z.enum(endotypes),
  /** Angina as recorded; without it the text names dysfunction and spasm, not angina (COVADIS needs the symptom). */
  angina: z.boolean().optional(),
});

const base64 = z
  .string()
  .min(1, { error: 'The PDF is empty.' })
  .regex(/^[A-Za-z0-9+/]+={0,2}$/, { error: 'The PDF must be base64 (RFC 4648, no line breaks).' });

/** A signed report version, as the bundle needs it. */
export const reportBundleInputSchema = z
  .strictObject({
    /** transaction: for a FHIR server (conditional creates and updates); collection: a file for other tools. */
    bundleType: z.enum(['transaction', 'collection']).default('transaction'),
    report: z.strictObject({
      /** Isobar's id of the report: the same for every version of it. */
      id: z.string().min(1),
      version: z.number().int().min(1),
      status: z.enum([...reportVersionStatuses, 'entered-in-error']),
      /** The version an amended report replaces. */
      previousVersion: z.number().int().min(1).optional(),
      signedAt: dateTime,
      signer: personSchema,
    }),
    patient: z.strictObject({
      /** The hospital's identifiers (MRN first); the EHR matches the patient by the first. */
      identifiers: z.array(identifierSchema).min(1, { error: 'The patient needs at least one identifier.' }),
      family: z.string().min(1),
      given: z.array(z.string().min(1)).default([]),
      birthDate: z.iso.date(),
      sex: z.enum(sexes),
    }),
    encounter: z.strictObject({ identifier: identifierSchema, class: z.enum(patientClasses) }).optional(),
    /** The order the study answers, by its accession number. */
    accession: identifierSchema.optional(),
    procedure: z.strictObject({ start: dateTime, end: dateTime.optional() }),
    /** The physician who did the procedure. */
    performer: personSchema,
    /** The department or hospital issuing the report. */
    organization: personSchema.optional(),
    analysis: analysisSchema,
    /** The lab's thresholds the report was judged by (defaults when absent). */
    thresholds: thresholdsSchema.optional(),
    /** The report's impression, as signed. */
    conclusion: z.string().min(1),
    pdf: z.strictObject({
      base64,
      /** SHA-256 of the PDF bytes, hex: checked against the bytes. */
      sha256: z.string().regex(/^[0-9a-f]{64}$/, { error: 'sha256 must be 64 lower-case hex digits.' }),
      title: z.string().min(1).optional(),
    }),
  })
  .superRefine((input, ctx) => {
    const r = input.report;
    if (r.status === 'amended') {
      if (r.previousVersion === undefined) {
        ctx.addIssue({ code: 'custom', path: ['report', 'previousVersion'], message: 'An amended report names the version it amends.', input: r });
      } else if (r.previousVersion >= r.version) {
        ctx.addIssue({ code: 'custom', path: ['report', 'previousVersion'], message: 'The amended version must be earlier than this version.', input: r });
      }
    } else if (r.status === 'final' && r.previousVersion !== undefined) {
      ctx.addIssue({ code: 'custom', path: ['report', 'previousVersion'], message: 'A final report amends no earlier version; use status amended.', input: r });
    }
    if (input.procedure.end !== undefined && Date.parse(input.procedure.end) < Date.parse(input.procedure.start)) {
      ctx.addIssue({ code: 'custom', path: ['procedure', 'end'], message: 'The procedure cannot end before it starts.', input: input.procedure });
    }
    const seen = new Set<string>();
    input.analysis.vessels.forEach((v, i) => {
      if (seen.has(v.id)) ctx.addIssue({ code: 'custom', path: ['analysis', 'vessels', i, 'id'], message: `Vessel id "${v.id}" is used twice.`, input: v.id });
      seen.add(v.id);
    });
    const bytes = Buffer.from(input.pdf.base64, 'base64');
    if (createHash('sha256').update(bytes).digest('hex') !== input.pdf.sha256) {
      ctx.addIssue({ code: 'custom', path: ['pdf', 'sha256'], message: 'The PDF does not match its SHA-256 fingerprint.', input: input.pdf.sha256 });
    }
  });

export type ReportBundleInput = z.input<typeof reportBundleInputSchema>;
type Input = z.output<typeof reportBundleInputSchema>;
type VesselInput = z.output<typeof vesselSchema>;

// ---------------------------------------------------------------------------------------------
// Small builders
// ---------------------------------------------------------------------------------------------

/** FHIR instant / dateTime with seconds and a zone (FHIR R4 §2.24.0.1 dateTime, instant). */
const instant = (iso: string) => new Date(iso).toISOString();

const conditional = (type: string, id: Identifier) =>
  `${type}?identifier=${encodeURIComponent(id.system!)}|${encodeURIComponent(id.value!)}`;

function personReference(p: z.output<typeof personSchema>, type: 'Practitioner' | 'Organization'): Reference {
  return { type, display: p.name, ...(p.identifier ? { identifier: p.identifier } : {}) };
}

/** UCUM code and the unit as printed, per kind of quantity (UCUM; FHIR R4 Quantity). */
const units: Record<'ratio' | 'imr' | 'percent', { code: string; unit: string }> = {
  ratio: { code: '1', unit: 'ratio' },
  imr: { code: 'mm[Hg].s', unit: 'mmHg·s' },
  percent: { code: '%', unit: '%' },
};

function quantity(value: number, kind: 'ratio' | 'imr' | 'percent'): Quantity {
  const u = units[kind];
  return { value: roundForDisplay(value, kind), unit: u.unit, system: UCUM, code: u.code };
}

const step = (kind: QuantityKind) => 10 ** -displayDecimals[kind];
/** The largest displayed value below `cut`, and the smallest above it (display precision). */
const shownBelow = (cut: number, kind: QuantityKind) => roundHalfAway(Math.ceil(cut / step(kind) - 1e-9) * step(kind) - step(kind), displayDecimals[kind]);
const shownAbove = (cut: number, kind: QuantityKind) => roundHalfAway(Math.floor(cut / step(kind) + 1e-9) * step(kind) + step(kind), displayDecimals[kind]);
const shownAtOrAbove = (cut: number, kind: QuantityKind) => roundHalfAway(Math.ceil(cut / step(kind) - 1e-9) * step(kind), displayDecimals[kind]);
const text = (v: number, kind: QuantityKind) => v.toFixed(displayDecimals[kind]);

/**
 * The range of normal values, at display precision, from the cut-off the flag was judged by.
 * `rule`: how the abnormal side is defined (at or below / below for low-is-abnormal indices, at or
 * above for IMR); `borderlineTo`: the upper end of a borderline band above an abnormal-below cut-off.
 */
function normalRange(
  rule: CutOffRule,
  cut: number,
  kind: 'ratio' | 'imr',
  borderline?: { upTo: number; inclusive: boolean },
): ObservationReferenceRange {
  const q = (v: number) => ({ value: v, unit: units[kind].unit, system: UCUM, code: units[kind].code });
  if (rule === 'atOrAbove') {
    const high = shownBelow(cut, kind);
    return { high: q(high), text: `normal below ${text(cut, kind)}; abnormal at ${text(cut, kind)} or above` };
  }
  if (borderline && borderline.upTo > cut) {
    const low = borderline.inclusive ? shownAbove(borderline.upTo, kind) : shownAtOrAbove(borderline.upTo, kind);
    const band = borderline.inclusive
      ? `borderline ${text(cut, kind)} to ${text(borderline.upTo, kind)}`
      : `borderline from ${text(cut, kind)} up to ${text(borderline.upTo, kind)}`;
    return { low: q(low), text: `abnormal below ${text(cut, kind)}; ${band}; normal from ${text(low, kind)}` };
  }
  if (rule === 'atOrBelow') {
    return { low: q(shownAbove(cut, kind)), text: `normal above ${text(cut, kind)}; abnormal at ${text(cut, kind)} or below` };
  }
  return { low: q(shownAtOrAbove(cut, kind)), text: `normal from ${text(cut, kind)}; abnormal below ${text(cut, kind)}` };
}

const borderlineLimit = { cfr: 'cfrBorderline', mrr: 'mrrBorderline' } as const;

/** An index's reference range, by its cut-off's rule (`cutOffRule`) and, for CFR and MRR, its borderline band. */
export function referenceRange(key: IndexCutOffKey, t: Thresholds): ObservationReferenceRange {
  const limit = key === 'cfr' || key === 'mrr' ? borderlineLimit[key] : undefined;
  const borderline = limit ? { upTo: t[limit], inclusive: cutOffRule[limit] === 'atOrBelow' } : undefined;
  return normalRange(cutOffRule[key], t[key], cutOffKind(key), borderline);
}

/**
 * Observation.interpretation from a flag. Abnormal is sent as L (low) for indices abnormal when low
 * and H (high) for IMR, both specialisations of A in HL7 v3 ObservationInterpretation; normal as N;
 * borderline as E (Equivocal: "results are borderline"), so a receiver neither hides it as normal
 * nor counts it as abnormal.
 */
function interpret(flag: Flag | undefined, abnormalSide: 'low' | 'high'): CodeableConcept[] | undefined {
  if (flag === undefined) return undefined;
  const coding: Coding =
    flag === 'normal' ? interpretation.normal : flag === 'borderline' ? interpretation.equivocal : interpretation[abnormalSide];
  return [{ coding: [{ ...coding }], text: flag === 'borderline' ? 'Borderline' : coding.display }];
}

const method = (...keys: LocalConceptKey[]): CodeableConcept => ({
  coding: keys.map(localCoding),
  text: keys.map((k) => localConcepts[k].display).join('; '),
});

function bodySite(v: VesselInput): CodeableConcept {
  const site = vesselBodySite[v.vessel];
  const name = vesselLongName[v.vessel];
  const words = [site.branchOfParent ? `${name} (branch of the ${site.display.toLowerCase()})` : name, v.segment].filter(Boolean);
  return { coding: [{ system: SNOMED, code: site.code, display: site.display }], text: words.join(', ') };
}

const nhprConcept: Record<NhprKind, { concept: LocalConceptKey; threshold: 'nhprWholeCycle' | 'nhprDiastolic' | 'nhprFullCycleMinimum' }> = {
  'whole-cycle': { concept: 'nhprWholeCycle', threshold: 'nhprWholeCycle' },
  diastolic: { concept: 'nhprDiastolic', threshold: 'nhprDiastolic' },
  'full-cycle-minimum': { concept: 'nhprFullCycleMinimum', threshold: 'nhprFullCycleMinimum' },
};

const imrMethodConcept: Readonly<Record<ImrMethod, LocalConceptKey>> = { 'pd-tmn': 'imrPdTmn', wedge: 'imrWedge', yong: 'imrYong' };

/** What one Observation says, before the fields every Observation shares. */
interface Measured {
  concept: LocalConceptKey;
  standard?: Coding[];
  value: Pick<Observation, 'valueQuantity' | 'valueCodeableConcept'>;
  interpretation?: CodeableConcept[];
  referenceRange?: ObservationReferenceRange[];
  method?: CodeableConcept;
  component?: ObservationComponent[];
  note?: string[];
  vessel?: VesselInput;
}

/** The Observations of one vessel: one per measured index (and the visual stenosis when recorded). */
function vesselMeasurements(v: VesselInput, t: Thresholds): Measured[] {
  const out: Measured[] = [];
  if (v.ffr !== undefined) {
    const notes: string[] = [];
    if (v.ffrGreyZone) notes.push(`In the FFR grey zone (${text(t.ffrGreyZoneLow, 'ratio')}–${text(t.ffr, 'ratio')}).`);
    out.push({
      concept: 'ffr',
      standard: [snomedFfr],
      value: { valueQuantity: quantity(v.ffr, 'ratio') },
      interpretation: interpret(v.ffrFlag, 'low'),
      referenceRange: [referenceRange('ffr', t)],
      method: method(v.ffrSource === 'entered' ? 'methodConsoleValue' : 'methodPressureDerived'),
      note: notes,
      vessel: v,
    });
  }
  if (v.restingPdPa !== undefined) {
    out.push({
      concept: 'restingPdPa',
      value: { valueQuantity: quantity(v.restingPdPa, 'ratio') },
      interpretation: interpret(v.restingPdPaFlag, 'low'),
      referenceRange: [referenceRange('restingPdPa', t)],
      method: method('methodPressureDerived'),
      vessel: v,
    });
  }
  if (v.nhpr !== undefined && v.nhprKind !== undefined) {
    const { concept, threshold } = nhprConcept[v.nhprKind];
    out.push({
      concept,
      value: { valueQuantity: quantity(v.nhpr, 'ratio') },
      interpretation: interpret(v.nhprFlag, 'low'),
      referenceRange: [referenceRange(threshold, t)],
      method: method('methodConsoleValue'),
      vessel: v,
    });
  }
  if (v.cfr !== undefined) {
    out.push({
      concept: 'cfr',
      standard: [dicomCfr],
      value: { valueQuantity: quantity(v.cfr, 'ratio') },
      interpretation: interpret(v.cfrFlag, 'low'),
      referenceRange: [referenceRange('cfr', t)],
      method: method('methodBolusThermodilution'),
      vessel: v,
    });
  }
  if (v.imr !== undefined) {
    const corrected = v.imrMethod !== undefined && v.imrMethod !== 'pd-tmn' && v.imrUncorrected !== undefined;
    out.push({
      concept: 'imr',
      value: { valueQuantity: quantity(v.imr, 'imr') },
      interpretation: interpret(v.imrFlag, 'high'),
      referenceRange: [referenceRange('imr', t)],
      method: method('methodBolusThermodilution', imrMethodConcept[v.imrMethod ?? 'pd-tmn']),
      component: corrected
        ? [{ code: { coding: [localCoding('imrUncorrected')], text: localConcepts.imrUncorrected.display }, valueQuantity: quantity(v.imrUncorrected!, 'imr') }]
        : undefined,
      vessel: v,
    });
  }
  if (v.rrr !== undefined) {
    out.push({
      concept: 'rrr',
      value: { valueQuantity: quantity(v.rrr, 'ratio') },
      interpretation: interpret(v.rrrFlag, 'low'),
      referenceRange: [referenceRange('rrr', t)],
      method: method('methodBolusThermodilution'),
      vessel: v,
    });
  }
  if (v.mrr !== undefined) {
    out.push({
      concept: 'mrr',
      value: { valueQuantity: quantity(v.mrr, 'ratio') },
      interpretation: interpret(v.mrrFlag, 'low'),
      referenceRange: [referenceRange('mrr', t)],
      method: method('methodBolusThermodilution'),
      note: ['Measured with bolus thermodilution; the published cut-offs were set with continuous thermodilution.'],
      vessel: v,
    });
  }
  if (v.visualStenosisPct !== undefined) {
    out.push({
      concept: 'visualStenosis',
      standard: [loincPercentStenosis],
      value: { valueQuantity: quantity(v.visualStenosisPct, 'percent') },
      vessel: v,
    });
  }
  return out;
}

/** Coronary function testing was done when acetylcholine was given or microvascular indices measured. */
export function coronaryFunctionTested(analysis: Input['analysis']): boolean {
  return analysis.vasoreactivity !== undefined || analysis.vessels.some((v) => v.cfr !== undefined || v.imr !== undefined);
}

function studyMeasurements(input: Input): Measured[] {
  const out: Measured[] = [];
  const a = input.analysis;
  if (a.vasoreactivity) {
    const r = a.vasoreactivity.result;
    const flag: Flag = r === 'negative' ? 'normal' : r === 'equivocal' ? 'borderline' : 'abnormal';
    out.push({
      concept: 'acetylcholineTest',
      value: { valueCodeableConcept: { coding: [localCoding(acetylcholineResultConcept[r])], text: localConcepts[acetylcholineResultConcept[r]].display } },
      interpretation: flag === 'abnormal' ? [{ coding: [{ ...interpretation.abnormal }], text: 'Abnormal' }] : interpret(flag, 'low'),
    });
  }
  if (coronaryFunctionTested(a)) {
    const e = a.endotype;
    out.push({
      concept: 'endotype',
      value: { valueCodeableConcept: { coding: [localCoding(endotypeConcept[e])], text: endotypeName(e, a.angina) } },
      interpretation:
        e === 'no-abnormality'
          ? [{ coding: [{ ...interpretation.normal }], text: 'Normal' }]
          : e === 'inconclusive'
            ? undefined
            : [{ coding: [{ ...interpretation.abnormal }], text: 'Abnormal' }],
    });
  }
  return out;
}

// ---------------------------------------------------------------------------------------------
// The bundle
// ---------------------------------------------------------------------------------------------

/** Stable identifier value of one Observation: the same in every version of the report. */
export function observationIdentifierValue(reportId: string, vesselId: string | null, conceptKey: LocalConceptKey): string {
  return `${reportId}/${vesselId === null ? 'study' : `vessel/${vesselId}`}/${localConcepts[conceptKey].code}`;
}

/**
 * A signed report version as a FHIR R4 Bundle: a DiagnosticReport (US Core note profile) with the PDF
 * as presentedForm, one Observation per measured index per vessel, the acetylcholine result and the
 * endotype when coronary function was tested, the Patient and (when given) the Encounter.
 *
 * In a transaction, Patient and Encounter are conditional creates (matched by identifier, never
 * duplicated) and the report and its observations conditional updates by their stable identifiers,
 * so sending the same report again, or an addendum of it, updates rather than duplicates. Every
 * fullUrl is a name-based UUID and every timestamp comes from the report, so the same input always
 * gives the same bundle. Throws the `ZodError` of `reportBundleInputSchema` on bad input.
 */
export function toReportBundle(raw: ReportBundleInput): Bundle {
  const input = reportBundleInputSchema.parse(raw);
  const t = resolveThresholds(input.thresholds);
  const { report } = input;
  const transaction = input.bundleType === 'transaction';
  const entries: BundleEntry[] = [];
  const add = (fullUrl: string, resource: BundleEntry['resource'], request: BundleEntry['request']) => {
    entries.push({ fullUrl, resource, ...(transaction ? { request } : {}) });
  };

  // Patient: matched by the first identifier.
  const p = input.patient;
  const patientKey = p.identifiers[0];
  const patientUrl = urnUuid(`Patient|${patientKey.system}|${patientKey.value}`);
  const patient: Patient = {
    resourceType: 'Patient',
    identifier: p.identifiers,
    name: [{ family: p.family, ...(p.given.length ? { given: p.given } : {}) }],
    gender: p.sex,
    birthDate: p.birthDate,
  };
  add(patientUrl, patient, { method: 'POST', url: 'Patient', ifNoneExist: conditional('Patient', patientKey).split('?')[1] });
  const subject: Reference = { reference: patientUrl, type: 'Patient' };

  let encounterRef: Reference | undefined;
  if (input.encounter) {
    const e = input.encounter;
    const encounterUrl = urnUuid(`Encounter|${e.identifier.system}|${e.identifier.value}`);
    const encounter: Encounter = {
      resourceType: 'Encounter',
      identifier: [e.identifier],
      // Created only when the EHR does not know the encounter; its real state is the EHR's to keep.
      status: 'unknown',
      class: { ...encounterClass[e.class] },
      subject,
    };
    add(encounterUrl, encounter, { method: 'POST', url: 'Encounter', ifNoneExist: conditional('Encounter', e.identifier).split('?')[1] });
    encounterRef = { reference: encounterUrl, type: 'Encounter' };
  }

  const effectivePeriod = { start: instant(input.procedure.start), ...(input.procedure.end ? { end: instant(input.procedure.end) } : {}) };
  const issued = instant(report.signedAt);
  const status = report.status;
  const operator = personReference(input.performer, 'Practitioner');

  // Observations.
  const measured: Array<{ vesselId: string | null; m: Measured }> = [
    ...input.analysis.vessels.flatMap((v) => vesselMeasurements(v, t).map((m) => ({ vesselId: v.id, m }))),
    ...studyMeasurements(input).map((m) => ({ vesselId: null, m })),
  ];
  const results: Reference[] = [];
  for (const { vesselId, m } of measured) {
    const identifier: Identifier = { system: IDENTIFIER_SYSTEMS.observation, value: observationIdentifierValue(report.id, vesselId, m.concept) };
    const fullUrl = urnUuid(`Observation|${identifier.value}`);
    const concept = localConcepts[m.concept];
    const observation: Observation = {
      resourceType: 'Observation',
      identifier: [identifier],
      status,
      category: [{ coding: [{ ...categoryProcedure }] }],
      code: { coding: [localCoding(m.concept), ...(m.standard ?? []).map((c) => ({ ...c }))], text: concept.display },
      subject,
      ...(encounterRef ? { encounter: encounterRef } : {}),
      effectivePeriod,
      issued,
      performer: [operator],
      ...m.value,
      ...(m.interpretation ? { interpretation: m.interpretation } : {}),
      ...(m.note && m.note.length ? { note: m.note.map((n) => ({ text: n })) } : {}),
      ...(m.vessel ? { bodySite: bodySite(m.vessel) } : {}),
      ...(m.method ? { method: m.method } : {}),
      ...(m.referenceRange ? { referenceRange: m.referenceRange } : {}),
      ...(m.component ? { component: m.component } : {}),
    };
    add(fullUrl, observation, { method: 'PUT', url: conditional('Observation', identifier) });
    results.push({ reference: fullUrl, type: 'Observation' });
  }

  // The report.
  const pdfBytes = Buffer.from(input.pdf.base64, 'base64');
  const reportIdentifier: Identifier = { system: IDENTIFIER_SYSTEMS.report, value: report.id };
  const title =
    input.pdf.title ??
    `Coronary physiology report, version ${report.version}${report.status === 'amended' ? ` (amends version ${report.previousVersion})` : ''}`;
  const presentedForm: Attachment = {
    contentType: 'application/pdf',
    data: input.pdf.base64,
    size: pdfBytes.length,
    // FHIR R4 Attachment.hash: "The calculated hash of the data using SHA-1. Represented using base64."
    hash: createHash('sha1').update(pdfBytes).digest('base64'),
    title,
    creation: issued,
  };
  const cft = coronaryFunctionTested(input.analysis);
  const diagnosticReport: DiagnosticReport = {
    resourceType: 'DiagnosticReport',
    meta: { profile: [US_CORE_DIAGNOSTIC_REPORT_NOTE] },
    identifier: [
      reportIdentifier,
      { use: 'secondary', system: IDENTIFIER_SYSTEMS.pdfSha256, value: input.pdf.sha256 },
    ],
    ...(input.accession ? { basedOn: [{ type: 'ServiceRequest', identifier: { ...input.accession, type: accessionType } }] } : {}),
    status,
    category: [{ coding: [{ ...categoryCardiacCath }] }, { coding: [{ ...categoryCardiology }] }],
    code: { coding: [{ ...codeCardiacCathStudy }], text: 'Cardiac catheterization study: coronary physiology' },
    subject,
    ...(encounterRef ? { encounter: encounterRef } : {}),
    effectivePeriod,
    issued,
    performer: input.organization ? [personReference(input.organization, 'Organization'), operator] : [operator],
    resultsInterpreter: [personReference(report.signer, 'Practitioner')],
    ...(results.length ? { result: results } : {}),
    conclusion: input.conclusion,
    ...(cft
      ? {
          conclusionCode: [
            { coding: [localCoding(endotypeConcept[input.analysis.endotype])], text: endotypeName(input.analysis.endotype, input.analysis.angina) },
          ],
        }
      : {}),
    presentedForm: [presentedForm],
  };
  add(urnUuid(`DiagnosticReport|${report.id}`), diagnosticReport, { method: 'PUT', url: conditional('DiagnosticReport', reportIdentifier) });

  const bundleValue = `${report.id}/v${report.version}`;
  return {
    resourceType: 'Bundle',
    id: uuidV5(`Bundle|${input.bundleType}|${bundleValue}`),
    identifier: { system: IDENTIFIER_SYSTEMS.bundle, value: bundleValue },
    type: input.bundleType,
    timestamp: issued,
    entry: entries,
  };
}

/** Identifier.type of an accession number: HL7 v2 table 0203 "ACSN". */
const accessionType: CodeableConcept = {
  coding: [{ system: 'http://terminology.hl7.org/CodeSystem/v2-0203', code: 'ACSN', display: 'Accession ID' }],
};
