import { describe, expect, it } from 'vitest';
import { addCodeSchema, compareCodes, decideCodeSchema, inputChanges, type FinalCode } from '../../../shared/coding/review';

const cpt = (code: string, modifiers: string[] = ['26'], units = 1): FinalCode => ({ system: 'CPT', code, units, modifiers });
const setId = '00000000-0000-4000-8000-000000000001';
const lineId = '00000000-0000-4000-8000-000000000002';

describe('compareCodes: a new version against the codes decided for the previous one', () => {
  it.each([
    { name: 'same code, units and modifiers', before: [cpt('93458')], after: [cpt('93458')], kinds: ['unchanged 93458'] },
    { name: 'modifiers in another order are the same', before: [cpt('93572', ['26', 'XU'])], after: [cpt('93572', ['XU', '26'])], kinds: ['unchanged 93572'] },
    { name: 'other units', before: [cpt('93572', ['26'], 1)], after: [cpt('93572', ['26'], 2)], kinds: ['changed 93572'] },
    { name: 'a code only in the new version', before: [cpt('93458')], after: [cpt('93458'), cpt('92928', ['LD'])], kinds: ['new 92928', 'unchanged 93458'] },
    { name: 'a decided code no longer suggested', before: [cpt('93458'), cpt('93571')], after: [cpt('93458')], kinds: ['dropped 93571', 'unchanged 93458'] },
    { name: 'nothing decided before', before: [], after: [cpt('93458')], kinds: ['new 93458'] },
  ])('$name — product design: an addendum is compared with the codes decided before (common practice in code review)', ({ before, after, kinds }) => {
    expect(compareCodes(before, after).map((c) => `${c.kind} ${c.code}`)).toEqual(kinds);
  });

  it('tells systems apart: the same characters in two systems are two codes — a code is only meaningful with its code system (common practice)', () => {
    const icd: FinalCode = { system: 'ICD-10-CM', code: '93458', units: 1, modifiers: [] };
    expect(compareCodes([icd], [cpt('93458')]).map((c) => `${c.kind} ${c.system}`)).toEqual(['new CPT', 'dropped ICD-10-CM']);
  });
});

describe('inputChanges: which facts the codes depend on differ', () => {
  const base = { billing: 'professional', setting: 'hospital', patientClass: 'outpatient', cath: { leftHeart: true, coronaryAngiography: true }, pci: [], physiology: [], vasoreactivity: null, diagnoses: { angina: true }, dateOfService: '2025-03-11', notes: [{ code: 'a', message: 'b' }] };
  it('ignores key order and the mapping notes — product design (common practice)', () => {
    expect(inputChanges(base, { ...base, cath: { coronaryAngiography: true, leftHeart: true }, notes: [] })).toEqual([]);
  });
  it('names each changed fact — product design (common practice)', () => {
    expect(inputChanges(base, { ...base, pci: [{ vessel: 'LAD', kind: 'stent' }], dateOfService: '2025-03-12' })).toEqual(['interventions', 'date of service']);
  });
  it('says the whole record when one version could not be read — product design (common practice)', () => {
    expect(inputChanges(base, null)).toEqual(['the whole record (one version could not be read for coding)']);
  });
});

describe('decision and added-code bodies', () => {
  it('require a reason to edit or reject, none to accept — an override of a suggestion is documented (common practice)', () => {
    expect(decideCodeSchema.safeParse({ decision: 'accept', setId, lineId }).success).toBe(true);
    expect(decideCodeSchema.safeParse({ decision: 'reject', setId, lineId }).error?.issues.map((i) => i.path.join('/'))).toEqual(['reason']);
    expect(decideCodeSchema.safeParse({ decision: 'edit', setId, lineId, code: '93572', units: 1, modifiers: [] }).error?.issues.map((i) => i.path.join('/'))).toEqual(['reason']);
  });
  it('check an added code against its system: HCPCS Level II is a letter A–V and four digits (CMS HCPCS Level II code structure)', () => {
    const add = (code: string, modifiers: string[] = []) => addCodeSchema.safeParse({ setId, system: 'HCPCS', code, units: 1, modifiers, reason: 'Facility stent code' });
    expect(add('c9600').data?.code).toBe('C9600');
    expect(add('C96000').error?.issues.map((i) => i.path.join('/'))).toEqual(['code']);
    expect(add('C9600', ['2']).error?.issues.map((i) => i.path.join('/'))).toEqual(['modifiers']);
  });
});
