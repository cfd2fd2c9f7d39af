import { describe, expect, it } from 'vitest';
import { suggestCodes, type CodingInput } from '../../../shared/coding';
import { input, lines, warningCodes } from './fixtures';

const SRC = {
  tab: 'CMS ICD-10-CM tabular list FY2024–FY2026: I25.10, I25.11- (I25.111 with documented spasm, I25.119 unspecified angina), I20.1 angina with documented spasm, I20.81 angina with coronary microvascular dysfunction, I25.85 chronic coronary microvascular dysfunction (new FY2024, effective 1 October 2023)',
  combo: 'ICD-10-CM Official Guidelines I.C.9.b and the Excludes1 note at I20 (angina with atherosclerotic heart disease of native coronary arteries is coded I25.1-)',
  symptom: 'ICD-10-CM Official Guidelines IV.D (outpatient: code the symptom when no diagnosis is established); R07.9 [memory]',
  covadis: 'COVADIS (Beltrame et al., EHJ 2017): spasm requires the usual symptoms reproduced; microvascular spasm is microvascular angina',
};

type D = CodingInput['diagnoses'];
const dx = (d: Partial<D>): D => ({ obstructiveCad: false, angina: false, microvascularDysfunction: false, vasospasm: null, ...d });

describe('ICD-10-CM from the signed findings', () => {
  const table: Array<{ name: string; d: D; expected: string[]; src: string }> = [
    { name: 'obstructive disease, no angina', d: dx({ obstructiveCad: true }), expected: ['I25.10'], src: SRC.tab },
    { name: 'obstructive disease with angina', d: dx({ obstructiveCad: true, angina: true }), expected: ['I25.119'], src: `${SRC.tab}; ${SRC.combo}` },
    { name: 'obstructive disease with angina and epicardial spasm', d: dx({ obstructiveCad: true, angina: true, vasospasm: 'epicardial' }), expected: ['I25.111'], src: `${SRC.tab}; ${SRC.combo}` },
    { name: 'obstructive disease with angina and microvascular dysfunction', d: dx({ obstructiveCad: true, angina: true, microvascularDysfunction: true }), expected: ['I25.119', 'I25.85'], src: `${SRC.tab}; ${SRC.combo}` },
    { name: 'obstructive disease, microvascular dysfunction, no angina', d: dx({ obstructiveCad: true, microvascularDysfunction: true }), expected: ['I25.10', 'I25.85'], src: SRC.tab },
    { name: 'no obstruction, angina with microvascular dysfunction', d: dx({ angina: true, microvascularDysfunction: true }), expected: ['I20.81'], src: SRC.tab },
    { name: 'no obstruction, angina with microvascular spasm', d: dx({ angina: true, vasospasm: 'microvascular' }), expected: ['I20.81'], src: `${SRC.tab}; ${SRC.covadis}` },
    { name: 'no obstruction, angina with epicardial spasm', d: dx({ angina: true, vasospasm: 'epicardial' }), expected: ['I20.1'], src: SRC.tab },
    { name: 'no obstruction, epicardial spasm and microvascular dysfunction', d: dx({ angina: true, vasospasm: 'epicardial', microvascularDysfunction: true }), expected: ['I20.1', 'I20.81'], src: SRC.tab },
    { name: 'microvascular dysfunction without angina', d: dx({ microvascularDysfunction: true }), expected: ['I25.85'], src: SRC.tab },
    { name: 'angina with no coronary finding', d: dx({ angina: true }), expected: ['I20.9'], src: SRC.tab },
    { name: 'nothing found, no angina', d: dx({}), expected: ['R07.9'], src: SRC.symptom },
  ];
  it.each(table)('$name → $expected — $src', ({ d, expected }) => {
    const r = suggestCodes(input({ diagnoses: d }));
    expect(r.codes.filter((c) => c.system === 'ICD-10-CM').map((c) => c.code)).toEqual(expected);
    expect(lines(r, 'ICD-10-CM').every((l) => l.endsWith('x1'))).toBe(true);
  });

  it(`with obstructive disease no I20 code is ever suggested — ${SRC.combo}`, () => {
    for (const vasospasm of [null, 'epicardial', 'microvascular'] as const) {
      for (const microvascularDysfunction of [false, true]) {
        const r = suggestCodes(input({ diagnoses: dx({ obstructiveCad: true, angina: true, vasospasm, microvascularDysfunction }) }));
        expect(r.codes.some((c) => c.code.startsWith('I20'))).toBe(false);
      }
    }
  });

  it(`spasm recorded without angina is coded as angina with spasm, and warned — ${SRC.covadis}`, () => {
    const r = suggestCodes(input({ diagnoses: dx({ vasospasm: 'epicardial' }) }));
    expect(r.codes.map((c) => c.code)).toEqual(['I20.1']);
    expect(warningCodes(r)).toContain('spasm-without-angina');
  });

  it(`microvascular spasm recorded without angina is coded as coronary microvascular dysfunction, as the report names it, and warned — ${SRC.tab}; ${SRC.covadis}`, () => {
    const r = suggestCodes(input({ diagnoses: dx({ vasospasm: 'microvascular' }) }));
    expect(r.codes.map((c) => c.code)).toEqual(['I25.85']);
    expect(r.warnings.find((w) => w.code === 'spasm-without-angina')?.message).toMatch(/I20\.81/);
  });

  it(`unspecified angina with disease points the coder at the specific codes — ${SRC.tab}`, () => {
    const r = suggestCodes(input({ diagnoses: dx({ obstructiveCad: true, angina: true }) }));
    expect(r.warnings.find((w) => w.code === 'angina-type')?.message).toMatch(/I25\.110.*I25\.112.*I25\.118/);
  });

  it(`a bypass graft in the study raises the native-or-graft question — ICD-10-CM tabular: I25.7- and I25.81- for grafts`, () => {
    const graft = suggestCodes(input({ diagnoses: dx({ obstructiveCad: true }), pci: [{ vessel: 'GRAFT', kind: 'stent' }] }));
    expect(warningCodes(graft)).toContain('native-or-graft');
    const native = suggestCodes(input({ diagnoses: dx({ obstructiveCad: true }) }));
    expect(warningCodes(native)).not.toContain('native-or-graft');
  });

  it('each diagnosis line names its rule and the ICD-10-CM release — common practice', () => {
    const r = suggestCodes(input({ diagnoses: dx({ angina: true, microvascularDysfunction: true }) }));
    expect(r.codes[0]).toMatchObject({ system: 'ICD-10-CM', code: 'I20.81', ruleId: 'icd10cm.microvascular-angina', codeSet: 'ICD-10-CM FY2026', modifiers: [] });
    expect(r.codes[0].rationale).toContain('microvascular dysfunction');
  });
});
