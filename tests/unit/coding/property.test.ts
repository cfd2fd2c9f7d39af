import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  checkCodeLine,
  codeEntry,
  interventionKinds,
  measuredIndices,
  pciAddOnPrimaries,
  physiologyPrimaryCodes,
  ruleById,
  suggestCodes,
  type CodingInput,
} from '../../../shared/coding';
import { vesselCodes } from '../../../shared/physiology';

const vessel = fc.constantFrom(...vesselCodes);
const arbInput: fc.Arbitrary<CodingInput> = fc.record({
  billing: fc.constantFrom('professional', 'facility', null),
  setting: fc.constantFrom('hospital', 'office', null),
  patientClass: fc.constantFrom('outpatient', 'inpatient', null),
  cath: fc.option(fc.record({ coronaryAngiography: fc.boolean(), leftHeart: fc.boolean(), rightHeart: fc.boolean(), graftAngiography: fc.boolean(), leftVentriculography: fc.boolean() }), { nil: null }),
  pci: fc.array(
    fc.record({ vessel, kind: fc.constantFrom(...interventionKinds), branch: fc.option(fc.boolean(), { nil: undefined }), stent: fc.option(fc.constantFrom('drug-eluting', 'bare-metal'), { nil: undefined }) }, { requiredKeys: ['vessel', 'kind'] }),
    { maxLength: 6 },
  ),
  physiology: fc.array(fc.record({ vessel, measured: fc.subarray([...measuredIndices]), hyperemicAgent: fc.boolean() }), { maxLength: 6 }),
  vasoreactivity: fc.option(fc.record({ agent: fc.constantFrom('acetylcholine', 'ergonovine'), vessel }), { nil: null }),
  diagnoses: fc.record({ obstructiveCad: fc.boolean(), angina: fc.boolean(), microvascularDysfunction: fc.boolean(), vasospasm: fc.constantFrom('epicardial', 'microvascular', null) }),
  dateOfService: fc.option(fc.date({ min: new Date('2015-10-01'), max: new Date('2028-12-31'), noInvalidDate: true }).map((d) => d.toISOString().slice(0, 10)), { nil: undefined }),
}, { requiredKeys: ['billing', 'setting', 'patientClass', 'cath', 'pci', 'physiology', 'vasoreactivity', 'diagnoses'] }) as fc.Arbitrary<CodingInput>;

const runs = { numRuns: 500 };

describe('properties over random sessions — common practice for claim lines; add-on rule from the CPT add-on convention', () => {
  it('every add-on has one of its primaries in the result, or an add-on warning', () => {
    fc.assert(
      fc.property(arbInput, (i) => {
        const r = suggestCodes(i);
        const present = new Set(r.codes.map((c) => c.code));
        for (const c of r.codes.filter((x) => x.addOn)) {
          const primaries = c.code === '93571' || c.code === '93572' ? [...physiologyPrimaryCodes] : pciAddOnPrimaries[c.code];
          expect(primaries, c.code).toBeDefined();
          const ok = primaries.some((p) => present.has(p)) || r.warnings.some((w) => w.code === 'add-on-without-primary' && w.message.includes(c.code));
          expect(ok, `${c.code} in ${JSON.stringify(i)}`).toBe(true);
        }
      }),
      runs,
    );
  });

  it('no duplicate code lines; units ≥ 1; every line well formed, known, from a known rule, with a rationale', () => {
    fc.assert(
      fc.property(arbInput, (i) => {
        const r = suggestCodes(i);
        const keys = r.codes.map((c) => `${c.system}|${c.code}|${c.modifiers.join(',')}`);
        expect(new Set(keys).size).toBe(keys.length);
        for (const c of r.codes) {
          expect(c.units).toBeGreaterThanOrEqual(1);
          expect(checkCodeLine(c)).toEqual([]);
          expect(codeEntry(c.system, c.code)).toBeDefined();
          const rule = ruleById.get(c.ruleId);
          expect(rule?.system).toBe(c.system);
          expect(c.rationale).not.toMatch(/\{\w+\}/);
          expect(c.rationale.length).toBeGreaterThan(20);
        }
        for (const w of r.warnings) if (w.ruleId) expect(ruleById.has(w.ruleId)).toBe(true);
      }),
      runs,
    );
  });

  it('modifier 26 only on a professional hospital claim; inpatient facility claims carry no CPT or HCPCS; at least one diagnosis', () => {
    fc.assert(
      fc.property(arbInput, (i) => {
        const r = suggestCodes(i);
        const has26 = r.codes.some((c) => c.modifiers.includes('26'));
        if (has26) expect(i.billing === 'professional' && i.setting === 'hospital').toBe(true);
        if (i.billing === 'facility' && i.patientClass === 'inpatient') expect(r.codes.some((c) => c.system === 'CPT' || c.system === 'HCPCS')).toBe(false);
        else expect(r.codes.some((c) => c.system === 'ICD-10-PCS')).toBe(false);
        const beforeFy2024 = typeof i.dateOfService === 'string' && i.dateOfService < '2023-10-01';
        if (!beforeFy2024) expect(r.codes.some((c) => c.system === 'ICD-10-CM')).toBe(true);
        if (i.billing === null || i.setting === null || i.patientClass === null) expect(r.warnings.some((w) => w.code === 'encounter-not-recorded' && w.blocking)).toBe(true);
      }),
      runs,
    );
  });

  it('the same input gives the same result', () => {
    fc.assert(
      fc.property(arbInput, (i) => {
        expect(suggestCodes(structuredClone(i))).toEqual(suggestCodes(i));
      }),
      { numRuns: 300 },
    );
  });
});
