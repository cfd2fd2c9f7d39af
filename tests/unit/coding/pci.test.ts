import { describe, expect, it } from 'vitest';
import { suggestCodes, type CodingInput } from '../../../shared/coding';
import { input, lines, warningCodes } from './fixtures';

const SRC = {
  codes: 'CPT coronary intervention descriptors 92920/92924/92928/92933 (one major coronary artery or branch) and 92921/92925/92929/92934 (each additional branch) [memory]',
  hierarchy: 'CPT coronary intervention guidelines: the most intensive treatment of a major artery takes the base code; hierarchy atherectomy with stent > atherectomy > stent > balloon (AHIMA Code Write, February 2013)',
  majors: 'CPT coronary intervention guidelines: five major coronary arteries (left main, LAD, circumflex, right, ramus intermedius), branches reported under their major artery; left main and ramus have no reportable branches (coding article summarising CPT)',
  modifiers: 'HCPCS coronary artery modifiers LM, LD, LC, RC, RI [memory]',
  graft: 'CPT 92937/92938: any combination of stent, atherectomy and angioplasty through a bypass graft, each additional branch served by it [memory]',
  des: 'CMS hospital outpatient reporting of drug-eluting stents with HCPCS C9600–C9605 [memory]',
};

const pci = (...entries: CodingInput['pci']) => input({ pci: entries });

describe('one major artery: the base code of its kind, with its modifier', () => {
  const kinds = [
    { kind: 'balloon', base: '92920' },
    { kind: 'stent', base: '92928' },
    { kind: 'atherectomy', base: '92924' },
    { kind: 'atherectomy-stent', base: '92933' },
  ] as const;
  const arteries = [
    { vessel: 'LM', modifier: 'LM' },
    { vessel: 'LAD', modifier: 'LD' },
    { vessel: 'LCX', modifier: 'LC' },
    { vessel: 'RCA', modifier: 'RC' },
    { vessel: 'RAMUS', modifier: 'RI' },
  ] as const;
  const cases = kinds.flatMap((k) => arteries.map((a) => ({ ...k, ...a })));
  it.each(cases)(`$kind in the $vessel → $base $modifier — ${SRC.codes}; ${SRC.modifiers}`, ({ kind, vessel, base, modifier }) => {
    const r = suggestCodes(pci({ vessel, kind }));
    expect(lines(r, 'CPT')).toEqual([`${base} x1 ${modifier}`]);
    expect(r.codes[0].ruleId).toBe('cpt.pci.artery');
    expect(r.codes[0].modifiers).not.toContain('26'); // intervention codes have no professional/technical split [memory]
  });
});

describe('branches: the add-on of the branch\'s own kind', () => {
  it.each([
    { kind: 'balloon', expected: ['92928 x1 LD', '92921 x1 LD'] },
    { kind: 'stent', expected: ['92928 x1 LD', '92929 x1 LD'] },
    // A branch treated more intensively than its artery takes the base code; the artery then takes the add-on of its own kind [memory].
    { kind: 'atherectomy', expected: ['92924 x1 LD', '92929 x1 LD'] },
    { kind: 'atherectomy-stent', expected: ['92933 x1 LD', '92929 x1 LD'] },
  ] as const)(`stent in the LAD plus $kind in a diagonal → $expected — ${SRC.codes}; ${SRC.hierarchy}`, ({ kind, expected }) => {
    const r = suggestCodes(pci({ vessel: 'LAD', kind: 'stent' }, { vessel: 'DIAGONAL', kind }));
    expect(lines(r, 'CPT')).toEqual(expected);
    expect(r.codes.filter((c) => c.system === 'CPT').map((c) => c.addOn)).toEqual([false, true]);
  });

  it.each([
    { kind: 'balloon', addOn: '92921' },
    { kind: 'stent', addOn: '92929' },
    { kind: 'atherectomy', addOn: '92925' },
    { kind: 'atherectomy-stent', addOn: '92934' },
  ] as const)(`atherectomy with stent in the RCA plus $kind in the PDA → 92933 RC + $addOn RC — ${SRC.codes}`, ({ kind, addOn }) => {
    const r = suggestCodes(pci({ vessel: 'RCA', kind: 'atherectomy-stent' }, { vessel: 'PDA', kind }));
    expect(lines(r, 'CPT')).toEqual(['92933 x1 RC', `${addOn} x1 RC`]);
  });

  it(`balloon in the LAD, stent in a diagonal: the stent takes the base code, the balloon the add-on — ${SRC.hierarchy} [the branch-first case from memory]`, () => {
    const r = suggestCodes(pci({ vessel: 'LAD', kind: 'balloon' }, { vessel: 'DIAGONAL', kind: 'stent' }));
    expect(lines(r, 'CPT')).toEqual(['92928 x1 LD', '92921 x1 LD']);
    expect(r.codes.find((c) => c.code === '92921')?.ruleId).toBe('cpt.pci.branch');
  });

  it(`stent in the LAD, balloon in a diagonal → 92928 LD + 92921 LD — ${SRC.codes}`, () => {
    const r = suggestCodes(pci({ vessel: 'LAD', kind: 'stent' }, { vessel: 'DIAGONAL', kind: 'balloon' }));
    expect(lines(r, 'CPT')).toEqual(['92928 x1 LD', '92921 x1 LD']);
  });

  it.each([
    { vessel: 'DIAGONAL', modifier: 'LD' },
    { vessel: 'OBTUSE_MARGINAL', modifier: 'LC' },
    { vessel: 'PDA', modifier: 'RC' },
    { vessel: 'PLB', modifier: 'RC' },
  ] as const)(`a stent in the $vessel alone → base code 92928 with its major artery's modifier $modifier — ${SRC.majors}; ${SRC.modifiers}`, ({ vessel, modifier }) => {
    const r = suggestCodes(pci({ vessel, kind: 'stent' }));
    expect(lines(r, 'CPT')).toEqual([`92928 x1 ${modifier}`]);
  });

  it(`"branch" on a major vessel is a branch of it — ${SRC.majors}`, () => {
    const r = suggestCodes(pci({ vessel: 'LCX', kind: 'stent' }, { vessel: 'LCX', kind: 'stent', branch: true }));
    expect(lines(r, 'CPT')).toEqual(['92928 x1 LC', '92929 x1 LC']);
  });

  it(`two branches of one artery with the same treatment → one add-on line with 2 units — ${SRC.codes}`, () => {
    const r = suggestCodes(pci({ vessel: 'RCA', kind: 'stent' }, { vessel: 'PDA', kind: 'stent' }, { vessel: 'PLB', kind: 'stent' }));
    expect(lines(r, 'CPT')).toEqual(['92928 x1 RC', '92929 x2 RC']);
  });

  it(`a branch of the left main or ramus is not reportable: coded as the artery, with a warning — ${SRC.majors}`, () => {
    for (const vessel of ['LM', 'RAMUS'] as const) {
      const r = suggestCodes(pci({ vessel, kind: 'stent', branch: true }));
      expect(lines(r, 'CPT')).toEqual([`92928 x1 ${vessel === 'LM' ? 'LM' : 'RI'}`]);
      expect(warningCodes(r)).toContain('branch-not-recognised');
    }
  });

  it(`more than two branches of one artery are warned — CPT recognises up to two branches per major artery [memory]`, () => {
    const r = suggestCodes(pci({ vessel: 'LAD', kind: 'stent', branch: true }, { vessel: 'DIAGONAL', kind: 'stent' }, { vessel: 'LAD', kind: 'balloon', branch: true }));
    // The unnamed LAD branch rows combine into one, so two branches remain: no warning.
    expect(warningCodes(r)).not.toContain('more-than-two-branches');
    expect(warningCodes(r)).toContain('pci-same-vessel-combined');
  });
});

describe('several major arteries and the hierarchy within one', () => {
  it(`each major artery gets its own base code — ${SRC.codes}; ${SRC.modifiers}`, () => {
    const r = suggestCodes(pci({ vessel: 'LAD', kind: 'stent' }, { vessel: 'RCA', kind: 'balloon' }, { vessel: 'LCX', kind: 'atherectomy-stent' }));
    expect(lines(r, 'CPT')).toEqual(['92928 x1 LD', '92920 x1 RC', '92933 x1 LC']);
    expect(r.codes.every((c) => !c.addOn)).toBe(true);
  });

  it.each([
    { kinds: ['balloon', 'stent'], code: '92928' },
    { kinds: ['stent', 'atherectomy'], code: '92924' },
    { kinds: ['atherectomy', 'atherectomy-stent'], code: '92933' },
    { kinds: ['balloon', 'atherectomy-stent', 'stent'], code: '92933' },
  ] as const)(`$kinds in the same LAD → one code, $code — ${SRC.hierarchy}`, ({ kinds, code }) => {
    const r = suggestCodes(input({ pci: kinds.map((kind) => ({ vessel: 'LAD' as const, kind })) }));
    expect(lines(r, 'CPT')).toEqual([`${code} x1 LD`]);
    expect(warningCodes(r)).toContain('pci-same-vessel-combined');
  });
});

describe('bypass grafts', () => {
  it(`an intervention through a graft → 92937, branch of the graft → 92938 — ${SRC.graft}`, () => {
    const r = suggestCodes(pci({ vessel: 'GRAFT', kind: 'stent' }, { vessel: 'GRAFT', kind: 'balloon', branch: true }));
    expect(lines(r, 'CPT')).toEqual(['92937 x1', '92938 x1']);
    expect(warningCodes(r)).toContain('graft-intervention-check');
  });
});

describe('hospital outpatient facility claims and drug-eluting stents', () => {
  const facility = { billing: 'facility', setting: 'hospital', patientClass: 'outpatient' } as const;
  it.each([
    { entries: [{ vessel: 'LAD', kind: 'stent', stent: 'drug-eluting' }], expected: ['C9600 x1 LD'] },
    { entries: [{ vessel: 'LAD', kind: 'stent', stent: 'drug-eluting' }, { vessel: 'DIAGONAL', kind: 'stent', stent: 'drug-eluting' }], expected: ['C9600 x1 LD', 'C9601 x1 LD'] },
    { entries: [{ vessel: 'RCA', kind: 'atherectomy-stent', stent: 'drug-eluting' }], expected: ['C9602 x1 RC'] },
    { entries: [{ vessel: 'GRAFT', kind: 'stent', stent: 'drug-eluting' }], expected: ['C9604 x1'] },
  ] as const)(`$entries → $expected — ${SRC.des}`, ({ entries, expected }) => {
    const r = suggestCodes(input({ ...facility, pci: [...entries] }));
    expect(lines(r, 'HCPCS')).toEqual(expected);
    expect(lines(r, 'CPT')).toEqual([]);
    expect(r.codes.every((c) => c.system !== 'HCPCS' || c.ruleId === 'hcpcs.pci.drug-eluting-stent')).toBe(true);
  });

  it(`a bare-metal stent keeps the CPT code; a stent of unrecorded type is warned — ${SRC.des}`, () => {
    const bare = suggestCodes(input({ ...facility, pci: [{ vessel: 'LAD', kind: 'stent', stent: 'bare-metal' }] }));
    expect(lines(bare)).toContain('92928 x1 LD');
    const unknown = suggestCodes(input({ ...facility, pci: [{ vessel: 'LAD', kind: 'stent' }] }));
    expect(lines(unknown)).toContain('92928 x1 LD');
    expect(warningCodes(unknown)).toContain('stent-type-not-recorded');
  });

  it(`a professional claim never gets the hospital stent codes — ${SRC.des}`, () => {
    const r = suggestCodes(pci({ vessel: 'LAD', kind: 'stent', stent: 'drug-eluting' }));
    expect(lines(r, 'CPT')).toEqual(['92928 x1 LD']);
    expect(warningCodes(r)).not.toContain('stent-type-not-recorded');
  });

  it(`an inpatient facility claim suggests no CPT intervention codes and says why — ICD-10-PCS is the inpatient hospital procedure code set (CMS)`, () => {
    const r = suggestCodes(input({ billing: 'facility', setting: 'hospital', patientClass: 'inpatient', pci: [{ vessel: 'LAD', kind: 'stent' }] }));
    expect(r.codes.filter((c) => c.system === 'CPT' || c.system === 'HCPCS')).toEqual([]);
    expect(warningCodes(r)).toContain('inpatient-pcs-not-built');
  });
});

it(`every intervention result reminds the coder of the acute-MI and chronic-occlusion codes — CPT 92941/92943 rank above the elective codes (AHIMA Code Write, February 2013)`, () => {
  const r = suggestCodes(pci({ vessel: 'LAD', kind: 'balloon' }));
  expect(r.warnings.find((w) => w.code === 'pci-lesion-type')?.message).toMatch(/92941.*92943/);
});
