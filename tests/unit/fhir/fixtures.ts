import { createHash } from 'node:crypto';
import { analyzeStudy, type PhysiologyInput } from '../../../shared/physiology';
import type { ReportBundleInput } from '../../../fhir/report-bundle';

/** A small stand-in for a signed PDF (the bytes only need to hash). */
export const pdfBytes = Buffer.from('%PDF-1.7\n% coronary physiology report\n%%EOF\n');

export const hashes = {
  sha256hex: createHash('sha256').update(pdfBytes).digest('hex'),
  sha1base64: createHash('sha1').update(pdfBytes).digest('base64'),
};

/**
 * Hand-computed check case A (from the published formulas, not from a paper): Pa/Pd rest 100/95,
 * hyperaemia 90/72, Tmn rest 0.90 s, hyperaemia 0.30 s → FFR 0.80, resting Pd/Pa 0.95, CFR 3.00,
 * IMR 21.6 → corrected (Yong, FFR ≤ 0.80) 20.52, RRR 3.96, MRR 4.17.
 */
export const caseA: PhysiologyInput['vessels'][number] = {
  id: 'vessel-lad',
  vessel: 'LAD',
  rest: { pa: 100, pd: 95, tmn: [0.9, 0.9, 0.9] },
  hyperemia: { pa: 90, pd: 72, tmn: [0.3, 0.3, 0.3] },
};

export function reportInput(physiology: PhysiologyInput = { vessels: [caseA] }, overrides: Partial<ReportBundleInput> = {}): ReportBundleInput {
  return {
    report: { id: 'report-7f3a', version: 1, status: 'final', signedAt: '2025-03-04T15:20:00+01:00', signer: { name: 'Dr Kemi Oduya', identifier: { system: 'http://hl7.org/fhir/sid/us-npi', value: '1234567893' } } },
    patient: {
      identifiers: [{ system: 'urn:oid:2.16.840.1.113883.19.5', value: 'MRN-000123' }],
      family: 'Example',
      given: ['Alex'],
      birthDate: '1961-07-14',
      sex: 'female',
    },
    encounter: { identifier: { system: 'urn:oid:2.16.840.1.113883.19.6', value: 'ENC-55' }, class: 'outpatient' },
    accession: { system: 'urn:oid:2.16.840.1.113883.19.7', value: 'ACC-2025-0042' },
    procedure: { start: '2025-03-04T09:05:00+01:00', end: '2025-03-04T10:10:00+01:00' },
    performer: { name: 'Dr Kemi Oduya', identifier: { system: 'http://hl7.org/fhir/sid/us-npi', value: '1234567893' } },
    organization: { name: 'Cardiac catheterisation laboratory' },
    analysis: analyzeStudy(physiology),
    conclusion: 'Haemodynamically significant LAD stenosis; microvascular function preserved.',
    pdf: { base64: pdfBytes.toString('base64'), sha256: hashes.sha256hex },
    ...overrides,
  };
}
