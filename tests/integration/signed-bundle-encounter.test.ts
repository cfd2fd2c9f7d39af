import type { Encounter } from 'fhir/r4';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { bundleOfLoaded, loadReportVersion } from '../../server/ehr/queries/report-version';
import { checkBundle, errorsOf, warmUpValidation } from '../../server/ehr/validate-bundle';
import { openTestDatabase } from '../support/app';
import { createPhysician, signCompleteStudy } from '../support/signing';

// FHIR R4 Encounter.class is 1..1 (v3 ActEncounterCode: AMB ambulatory, IMP inpatient encounter): a
// report signed through the signing code carries the patient class recorded on the study, so the
// bundle built from the stored version names the encounter; without a class it is left out.

let db: DataSource;
beforeAll(async () => {
  db = await openTestDatabase();
  await warmUpValidation();
}, 120_000);
afterAll(async () => {
  await db?.destroy();
});

const identifierSystems = { patient: 'urn:oid:2.16.840.1.113883.19.5.1', encounter: 'urn:oid:2.16.840.1.113883.19.5.2', accession: 'urn:oid:2.16.840.1.113883.19.5.3' };

async function bundleSignedWith(patientClass: 'inpatient' | 'outpatient' | null) {
  const signed = await signCompleteStudy(db, await createPhysician(db), { patientClass });
  const loaded = await loadReportVersion(db.manager, signed.reportVersionId);
  const bundle = bundleOfLoaded(loaded!, identifierSystems);
  expect(errorsOf(checkBundle(bundle))).toEqual([]);
  const encounters = (bundle.entry ?? []).map((e) => e.resource).filter((r): r is Encounter => r?.resourceType === 'Encounter');
  return { signed, encounters };
}

describe('the Encounter of a bundle built from a report signed through the signing code', () => {
  it('an outpatient study sends its encounter number with class AMB', async () => {
    const { signed, encounters } = await bundleSignedWith('outpatient');
    expect(encounters).toHaveLength(1);
    expect(encounters[0].class).toMatchObject({ system: 'http://terminology.hl7.org/CodeSystem/v3-ActCode', code: 'AMB' });
    expect(encounters[0].identifier![0]).toEqual({ system: identifierSystems.encounter, value: `ENC-${signed.mrn}` });
  }, 60_000);

  it('an inpatient study sends class IMP', async () => {
    const { encounters } = await bundleSignedWith('inpatient');
    expect(encounters.map((e) => e.class.code)).toEqual(['IMP']);
  }, 60_000);

  it('without a recorded patient class the encounter is left out rather than guessed', async () => {
    const { encounters } = await bundleSignedWith(null);
    expect(encounters).toEqual([]);
  }, 60_000);
});
