import { describe, expect, it } from 'vitest';
import { ZodError } from 'zod';
import { checkCodeFormat, checkCodeLine, codeTable, suggestCodes, type CodingInput } from '../../../shared/coding';
import { input } from './fixtures';

describe('bad input throws a ZodError, never a silent code', () => {
  const bad: Array<[string, unknown]> = [
    ['missing billing', (() => { const { billing: _, ...rest } = input(); return rest; })()],
    ['unknown billing', { ...input(), billing: 'global' }],
    ['unknown vessel in pci', input({ pci: [{ vessel: 'LEFT' as never, kind: 'stent' }] })],
    ['unknown intervention kind', input({ pci: [{ vessel: 'LAD', kind: 'laser' as never }] })],
    ['unknown measured index', input({ physiology: [{ vessel: 'LAD', measured: ['qfr' as never], hyperemicAgent: true }] })],
    ['hyperemicAgent missing', input({ physiology: [{ vessel: 'LAD', measured: ['ffr'] } as never] })],
    ['cath missing a flag', input({ cath: { coronaryAngiography: true, leftHeart: true, rightHeart: false } as never })],
    ['unknown field', { ...input(), extra: 1 }],
    ['diagnoses missing', (() => { const { diagnoses: _, ...rest } = input(); return rest; })()],
    ['bad date', input({ dateOfService: '2025-13-40' })],
    ['unknown provocation agent', input({ vasoreactivity: { agent: 'adenosine' as never, vessel: 'LAD' } })],
    ['not an object', 42],
  ];
  it.each(bad)('%s → ZodError: the engine never codes an input it cannot read (common practice)', (_name, value) => {
    expect(() => suggestCodes(value as CodingInput)).toThrow(ZodError);
  });

  it('a valid minimal input is accepted — common practice', () => {
    expect(() => suggestCodes(input())).not.toThrow();
  });
});

describe('code formats', () => {
  const SRC = {
    cpt: 'AMA CPT code structure: Category I five digits, Category II four digits + F, Category III four digits + T',
    hcpcs: 'CMS HCPCS Level II structure: one letter and four digits',
    cm: 'CMS ICD-10-CM code structure: 3–7 characters, letter first, second a digit, a point after the third',
    pcs: 'CMS ICD-10-PCS code structure: seven characters, digits and letters other than I and O',
  };
  it.each([
    ['CPT', '93571', true, SRC.cpt],
    ['CPT', '0523T', true, SRC.cpt],
    ['CPT', '4010F', true, SRC.cpt],
    ['CPT', '9357', false, SRC.cpt],
    ['CPT', '93571-26', false, SRC.cpt],
    ['CPT', 'C9600', false, SRC.cpt],
    ['HCPCS', 'C9600', true, SRC.hcpcs],
    ['HCPCS', 'c9600', false, SRC.hcpcs],
    ['HCPCS', '93571', false, SRC.hcpcs],
    ['ICD-10-CM', 'I25.10', true, SRC.cm],
    ['ICD-10-CM', 'I20.81', true, SRC.cm],
    ['ICD-10-CM', 'R079', false, SRC.cm],
    ['ICD-10-CM', 'I25', true, SRC.cm],
    ['ICD-10-CM', 'I25.', false, SRC.cm],
    ['ICD-10-CM', '125.10', false, SRC.cm],
    ['ICD-10-PCS', '4A033BC', true, SRC.pcs],
    ['ICD-10-PCS', '4A033B', false, SRC.pcs],
    ['ICD-10-PCS', '4A033BO', false, SRC.pcs],
  ] as const)('%s %s → valid %s — %s', (system, code, valid, _source) => {
    const p = checkCodeFormat(system, code);
    if (valid) expect(p).toBeNull();
    else expect(p?.message).toContain(system);
  });

  it('every code in the table is well formed — the code-set structures above', () => {
    for (const c of codeTable) expect(checkCodeFormat(c.system, c.code), `${c.system} ${c.code}`).toBeNull();
    expect(new Set(codeTable.map((c) => `${c.system} ${c.code}`)).size).toBe(codeTable.length);
  });

  it.each([
    [{ system: 'CPT', code: '92928', modifiers: ['LD'], units: 1 }, []],
    [{ system: 'CPT', code: '93572', modifiers: ['26'], units: 2 }, []],
    [{ system: 'CPT', code: '92928', modifiers: ['L'], units: 1 }, ['modifiers']],
    [{ system: 'CPT', code: '92928', modifiers: ['26', '26'], units: 1 }, ['modifiers']],
    [{ system: 'CPT', code: '92928', modifiers: [], units: 0 }, ['units']],
    [{ system: 'CPT', code: '92928', modifiers: [], units: 1.5 }, ['units']],
    [{ system: 'ICD-10-CM', code: 'I25.10', modifiers: ['26'], units: 1 }, ['modifiers']],
    [{ system: 'ICD-10-CM', code: 'I25.10', modifiers: [], units: 2 }, ['units']],
    [{ system: 'ICD-10-PCS', code: 'XYZ', modifiers: [], units: 1 }, ['code']],
  ] as const)('%o → problems in %o — modifiers are two characters (CMS claim instructions); diagnoses take no units or modifiers [memory]', (line, fields) => {
    expect(checkCodeLine({ ...line, modifiers: [...line.modifiers] }).map((p) => p.field)).toEqual(fields);
  });
});
