import { beforeAll, describe, expect, it } from 'vitest';
import type { Bundle, DiagnosticReport, Encounter } from 'fhir/r4';
import { buildReportBundle, type StoredReportVersion } from '../../../server/ehr/build-report-bundle';
import { checkBundle, codesOf, errorsOf, warmUpValidation } from '../../../server/ehr/validate-bundle';
import { analyzeStudy } from '../../../shared/physiology';
import { caseA, hashes, pdfBytes } from '../fhir/fixtures';

// Encounter.class is required (FHIR R4 Encounter.class 1..1, binding v3 ActEncounterCode): the
// encounter is sent only when the signed record says whether the patient was in or out.

beforeAll(() => warmUpValidation(), 60_000);

const identifierSystems = { patient: 'urn:oid:2.16.840.1.113883.19.5.1', encounter: 'urn:oid:2.16.840.1.113883.19.5.2', accession: 'urn:oid:2.16.840.1.113883.19.5.3' };

/** A stored version whose snapshot is shaped as the signing code stores the record; `change` edits it. */
function version(change: (snapshot: Record<string, any>) => void = () => undefined): StoredReportVersion {
  const snapshot: Record<string, any> = {
    id: 'study-1',
    accession: 'ACC-2025-0042',
    patient: { mrn: 'MRN-000123', familyName: 'Example', givenName: 'Alex', birthDate: '1961-07-14', sex: 'female' },
    details: { encounter: 'ENC-55', procedureStartedAt: '2025-03-04T09:05:00+01:00', procedureEndedAt: '2025-03-04T10:10:00+01:00', operatorId: null },
    vessels: [{ id: 'vessel-lad', segment: null }],
    findings: { impression: 'Invented impression.' },
  };
  change(snapshot);
  return {
    id: 'version-1',
    studyId: 'study-1',
    versionNo: 1,
    status: 'final',
    snapshot,
    analysis: analyzeStudy({ vessels: [caseA] }),
    thresholds: undefined,
    pdf: pdfBytes,
    pdfSha256: hashes.sha256hex,
    signerName: 'Dr A',
    signedAt: new Date('2025-03-04T15:20:00+01:00'),
  };
}

const build = (v: StoredReportVersion) => buildReportBundle(v, { identifierSystems });
const encounters = (b: Bundle) => b.entry!.filter((e) => e.resource?.resourceType === 'Encounter').map((e) => e.resource as Encounter);
const report = (b: Bundle) => b.entry!.find((e) => e.resource?.resourceType === 'DiagnosticReport')!.resource as DiagnosticReport;
const expectNoErrors = (b: Bundle) => {
  const issues = checkBundle(b, { requireType: ['transaction'] });
  expect(errorsOf(issues), JSON.stringify(issues, null, 1)).toEqual([]);
};

describe('the Encounter of a delivered report', () => {
  it.each([
    // HL7 v3 ActCode: AMB ambulatory, IMP inpatient encounter (FHIR R4 Encounter.class example binding v3 ActEncounterCode).
    ['outpatient', 'AMB'],
    ['inpatient', 'IMP'],
  ] as const)('patient class %s recorded in the details: one Encounter, class %s, referenced by the report; the validator finds no error', (patientClass, code) => {
    const b = build(version((s) => (s.details.patientClass = patientClass)));
    const [encounter] = encounters(b);
    expect(encounters(b)).toHaveLength(1);
    expect(encounter.class).toMatchObject({ system: 'http://terminology.hl7.org/CodeSystem/v3-ActCode', code });
    expect(codesOf('http://terminology.hl7.org/CodeSystem/v3-ActCode')!.has(code)).toBe(true);
    expect(encounter.identifier).toEqual([{ system: identifierSystems.encounter, value: 'ENC-55' }]);
    const entry = b.entry!.find((e) => e.resource === encounter)!;
    expect(report(b).encounter?.reference).toBe(entry.fullUrl);
    expectNoErrors(b);
  });

  it('patient class recorded in the coding section only: the Encounter is sent with it', () => {
    const b = build(version((s) => (s.coding = { patientClass: 'outpatient' })));
    expect(encounters(b).map((e) => e.class.code)).toEqual(['AMB']);
    expectNoErrors(b);
  });

  it.each([
    ['no patient class recorded', (s: Record<string, any>) => (s.details.patientClass = null)],
    ['a patient class that is not one of ours', (s: Record<string, any>) => (s.details.patientClass = 'emergency')],
  ])('%s: an encounter number alone sends no Encounter and the report names none; the validator finds no error', (_name, change) => {
    const b = build(version(change));
    expect(encounters(b)).toEqual([]);
    expect(report(b).encounter).toBeUndefined();
    expect(JSON.stringify(b)).not.toContain('ENC-55');
    expectNoErrors(b);
  });

  it('no encounter number: no Encounter, whatever the patient class', () => {
    const b = build(version((s) => ((s.details.encounter = null), (s.details.patientClass = 'inpatient'))));
    expect(encounters(b)).toEqual([]);
    expectNoErrors(b);
  });

  it('the validator would refuse an Encounter without a class (FHIR R4 Encounter.class 1..1)', () => {
    const b = build(version((s) => (s.details.patientClass = 'outpatient')));
    delete (encounters(b)[0] as Partial<Encounter>).class;
    const index = b.entry!.findIndex((e) => e.resource?.resourceType === 'Encounter');
    const errors = errorsOf(checkBundle(b, { requireType: ['transaction'] }));
    expect(errors).toContainEqual(expect.objectContaining({ code: 'structure', expression: [`Bundle.entry[${index}].resource.class`] }));
  });
});
