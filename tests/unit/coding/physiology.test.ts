import { describe, expect, it } from 'vitest';
import { suggestCodes, type CodingInput } from '../../../shared/coding';
import { angiography, input, lines, warningCodes } from './fixtures';

const SRC = {
  add: 'CPT 93571/93572 descriptor: flow reserve or pressure-derived measurement by wire during coronary angiography including pharmacologically induced stress; initial vessel / each additional vessel (add-on codes)',
  perVessel: 'coding articles summarising CPT: 93571/93572 count vessels, not indices (FFR + CFR + IMR in one vessel is one vessel)',
  primaries: 'CPT parenthetical for 93571/93572: use with 92920–92943 and 93454–93461 [list partly from memory]',
  resting: 'CPT 93571 wording "including pharmacologically induced stress"; whether a resting-only ratio meets it is unsettled [memory]',
  pcs: 'ICD-10-PCS table 4A0: 4A033BC coronary arterial pressure, 4A0335C coronary arterial flow, percutaneous [memory — check against the CMS PCS tables]',
  pc: 'CMS physician fee schedule PC/TC split for 93571/93572: modifier 26 on the physician\'s hospital claim [memory]',
};

type P = CodingInput['physiology'][number];
const hyp = (vessel: P['vessel'], ...measured: P['measured']): P => ({ vessel, measured, hyperemicAgent: true });
const rest = (vessel: P['vessel'], ...measured: P['measured']): P => ({ vessel, measured, hyperemicAgent: false });
const withCath = (physiology: P[], o: Partial<CodingInput> = {}) => input({ cath: angiography({ leftHeart: true }), physiology, ...o });

describe('93571 for the first vessel, 93572 per additional vessel, whatever was measured', () => {
  it.each([
    { name: 'FFR in one vessel', physiology: [hyp('LAD', 'ffr')], expected: ['93571 x1 26'] },
    { name: 'FFR, CFR and IMR in one vessel', physiology: [hyp('LAD', 'ffr', 'cfr', 'imr')], expected: ['93571 x1 26'] },
    { name: 'FFR in two vessels', physiology: [hyp('LAD', 'ffr'), hyp('RCA', 'ffr')], expected: ['93571 x1 26', '93572 x1 26'] },
    { name: 'three vessels, different indices', physiology: [hyp('LAD', 'ffr', 'cfr', 'imr'), hyp('LCX', 'ffr'), hyp('RCA', 'cfr')], expected: ['93571 x1 26', '93572 x2 26'] },
    { name: 'a graft counts as a vessel', physiology: [hyp('LAD', 'ffr'), hyp('GRAFT', 'ffr')], expected: ['93571 x1 26', '93572 x1 26'] },
    { name: 'a vessel with nothing measured does not count', physiology: [hyp('LAD', 'ffr'), hyp('RCA')], expected: ['93571 x1 26'] },
  ])(`$name → $expected — ${SRC.add}; ${SRC.perVessel}`, ({ physiology, expected }) => {
    const r = suggestCodes(withCath(physiology));
    expect(lines(r, 'CPT').filter((l) => l.startsWith('9357'))).toEqual(expected);
    expect(r.codes.filter((c) => c.code.startsWith('9357')).every((c) => c.addOn)).toBe(true);
    expect(warningCodes(r)).not.toContain('add-on-without-primary');
  });

  it(`the rationale says the hyperaemic drug is included and 93463 is not added — ${SRC.add}`, () => {
    const r = suggestCodes(withCath([hyp('LAD', 'ffr', 'cfr')]));
    const line = r.codes.find((c) => c.code === '93571');
    expect(line?.ruleId).toBe('cpt.physiology.first-vessel');
    expect(line?.rationale).toContain('LAD');
    expect(line?.rationale).toContain('FFR and CFR');
    expect(line?.rationale).toContain('93463 is not added');
    expect(r.codes.some((c) => c.code === '93463')).toBe(false);
  });

  it(`an office claim carries no modifier 26 — ${SRC.pc}`, () => {
    const r = suggestCodes(withCath([hyp('LAD', 'ffr'), hyp('RCA', 'ffr')], { setting: 'office' }));
    expect(lines(r, 'CPT')).toEqual(['93458 x1', '93571 x1', '93572 x1']);
  });

  it(`two rows for the same vessel count once, with a warning — ${SRC.perVessel}`, () => {
    const r = suggestCodes(withCath([hyp('LAD', 'ffr'), hyp('LAD', 'cfr', 'imr')]));
    expect(lines(r, 'CPT').filter((l) => l.startsWith('9357'))).toEqual(['93571 x1 26']);
    expect(warningCodes(r)).toContain('physiology-vessel-repeated');
  });
});

describe('primaries for the add-ons', () => {
  it.each<{ name: string; o: Partial<CodingInput> }>([
    { name: 'coronary angiography', o: { cath: angiography() } },
    { name: 'a coronary intervention', o: { pci: [{ vessel: 'LAD', kind: 'stent' }] } },
  ])(`with $name there is no add-on warning — ${SRC.primaries}`, ({ o }) => {
    const r = suggestCodes(input({ ...o, physiology: [hyp('LAD', 'ffr')] }));
    expect(warningCodes(r)).not.toContain('add-on-without-primary');
  });

  it.each([
    { name: 'no catheterization and no intervention', cath: null },
    { name: 'a right heart catheterization without coronary angiography', cath: angiography({ coronaryAngiography: false, rightHeart: true }) },
  ])(`$name → the add-on is still suggested, with a warning — ${SRC.primaries}`, ({ cath }) => {
    const r = suggestCodes(input({ cath, physiology: [hyp('LAD', 'ffr')] }));
    expect(lines(r, 'CPT')).toContain('93571 x1 26');
    const w = r.warnings.find((x) => x.code === 'add-on-without-primary');
    expect(w?.message).toContain('93571');
    expect(w?.ruleId).toBe('review.add-on-primary');
  });
});

describe('resting-only physiology against the "pharmacologic stress" wording', () => {
  it(`a resting ratio without a hyperaemic drug is suggested with a warning naming the vessel — ${SRC.resting}`, () => {
    const r = suggestCodes(withCath([rest('LAD', 'nhpr')]));
    expect(lines(r, 'CPT')).toContain('93571 x1 26');
    const w = r.warnings.find((x) => x.code === 'resting-only-physiology');
    expect(w?.message).toContain('LAD');
    expect(w?.message).toContain('pharmacologically induced stress');
  });

  it(`a hyperaemic vessel takes the first-vessel code before a resting-only one — ${SRC.resting}`, () => {
    const r = suggestCodes(withCath([rest('RCA', 'nhpr'), hyp('LAD', 'ffr')]));
    expect(r.codes.find((c) => c.code === '93571')?.rationale).toContain('LAD');
    expect(r.codes.find((c) => c.code === '93572')?.rationale).toContain('RCA');
    expect(r.warnings.find((x) => x.code === 'resting-only-physiology')?.message).toContain('RCA');
  });

  it(`all vessels with a hyperaemic drug → no resting-only warning — ${SRC.add}`, () => {
    const r = suggestCodes(withCath([hyp('LAD', 'ffr', 'nhpr')]));
    expect(warningCodes(r)).not.toContain('resting-only-physiology');
  });
});

describe('a branch of a measured major vessel', () => {
  it.each([
    { branch: 'DIAGONAL', major: 'LAD' },
    { branch: 'OBTUSE_MARGINAL', major: 'LCX' },
    { branch: 'PDA', major: 'RCA' },
  ] as const)(`$branch with its $major measured → counted as another vessel, with a warning — ${SRC.perVessel}`, ({ branch, major }) => {
    const r = suggestCodes(withCath([hyp(major, 'ffr'), hyp(branch, 'ffr')]));
    expect(lines(r, 'CPT')).toContain('93572 x1 26');
    expect(warningCodes(r)).toContain('physiology-branch-counted');
  });

  it(`a branch measured without its major vessel raises no branch warning — ${SRC.perVessel}`, () => {
    const r = suggestCodes(withCath([hyp('LCX', 'ffr'), hyp('DIAGONAL', 'ffr')]));
    expect(warningCodes(r)).not.toContain('physiology-branch-counted');
  });
});

describe('inpatient facility claims: ICD-10-PCS measurement codes instead of CPT', () => {
  const inpatient = { billing: 'facility', setting: 'hospital', patientClass: 'inpatient' } as const;
  it.each([
    { name: 'FFR', physiology: [hyp('LAD', 'ffr')], expected: ['4A033BC x1'] },
    { name: 'a resting ratio', physiology: [rest('LAD', 'nhpr')], expected: ['4A033BC x1'] },
    { name: 'CFR and IMR', physiology: [hyp('LAD', 'cfr', 'imr')], expected: ['4A0335C x1'] },
    { name: 'FFR, CFR and IMR in two vessels', physiology: [hyp('LAD', 'ffr', 'cfr', 'imr'), hyp('RCA', 'ffr')], expected: ['4A033BC x1', '4A0335C x1'] },
  ])(`$name → $expected — ${SRC.pcs}`, ({ physiology, expected }) => {
    const r = suggestCodes(withCath(physiology, inpatient));
    expect(lines(r, 'ICD-10-PCS')).toEqual(expected);
    expect(lines(r, 'CPT')).toEqual([]);
  });

  it(`professional claims for inpatients keep CPT with modifier 26 — ${SRC.pc}`, () => {
    const r = suggestCodes(withCath([hyp('LAD', 'ffr')], { patientClass: 'inpatient' }));
    expect(lines(r, 'CPT')).toEqual(['93458 x1 26', '93571 x1 26']);
    expect(lines(r, 'ICD-10-PCS')).toEqual([]);
  });
});
