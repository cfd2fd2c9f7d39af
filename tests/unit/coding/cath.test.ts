import { describe, expect, it } from 'vitest';
import { suggestCodes } from '../../../shared/coding';
import { angiography, input, lines, warningCodes } from './fixtures';

const SRC = {
  family: 'CPT diagnostic catheterization descriptors 93454–93461: coronary angiography with or without graft angiography, right, left or both heart catheterizations, one code per combination [memory, well known]',
  heart: 'CPT descriptors 93451 (right heart), 93452 (left heart), 93453 (both), no coronary angiography [memory, well known]',
  lv: 'CPT descriptors 93452/93458–93461: left ventriculography included "when performed" [memory, well known]',
  pc: 'CMS physician fee schedule PC/TC indicator for 93451–93461 and 93571/93572 (professional component split): modifier 26 on the physician\'s hospital claim [memory]',
};

describe('diagnostic catheterization with coronary angiography: one code per combination', () => {
  const table = [
    { left: false, right: false, graft: false, code: '93454' },
    { left: false, right: false, graft: true, code: '93455' },
    { left: false, right: true, graft: false, code: '93456' },
    { left: false, right: true, graft: true, code: '93457' },
    { left: true, right: false, graft: false, code: '93458' },
    { left: true, right: false, graft: true, code: '93459' },
    { left: true, right: true, graft: false, code: '93460' },
    { left: true, right: true, graft: true, code: '93461' },
  ];
  it.each(table)(`left $left, right $right, graft $graft → $code — ${SRC.family}`, ({ left, right, graft, code }) => {
    const r = suggestCodes(input({ cath: angiography({ leftHeart: left, rightHeart: right, graftAngiography: graft }) }));
    expect(lines(r, 'CPT')).toEqual([`${code} x1 26`]);
    expect(r.codes[0].ruleId).toBe('cpt.cath.coronary-angiography');
    expect(r.codes[0].addOn).toBe(false);
  });

  it(`left ventriculography adds no code of its own — ${SRC.lv}`, () => {
    const r = suggestCodes(input({ cath: angiography({ leftHeart: true, leftVentriculography: true }) }));
    expect(lines(r, 'CPT')).toEqual(['93458 x1 26']);
    expect(r.codes[0].rationale).toContain('left ventriculography is included');
  });
});

describe('heart catheterization without coronary angiography', () => {
  it.each([
    { left: false, right: true, code: '93451' },
    { left: true, right: false, code: '93452' },
    { left: true, right: true, code: '93453' },
  ])(`left $left, right $right → $code — ${SRC.heart}`, ({ left, right, code }) => {
    const r = suggestCodes(input({ cath: angiography({ coronaryAngiography: false, leftHeart: left, rightHeart: right }) }));
    expect(lines(r, 'CPT')).toEqual([`${code} x1 26`]);
    expect(r.codes[0].ruleId).toBe('cpt.cath.heart-only');
  });

  it(`nothing ticked → no code and a warning — ${SRC.family}`, () => {
    const r = suggestCodes(input({ cath: angiography({ coronaryAngiography: false }) }));
    expect(lines(r, 'CPT')).toEqual([]);
    expect(warningCodes(r)).toContain('cath-nothing-recorded');
  });

  it(`graft angiography without native coronary angiography cannot be decided — ${SRC.family}`, () => {
    const r = suggestCodes(input({ cath: angiography({ coronaryAngiography: false, graftAngiography: true }) }));
    expect(lines(r, 'CPT')).toEqual([]);
    expect(warningCodes(r)).toContain('graft-angiography-without-coronary');
  });
});

describe('the claim decides modifier 26 and the code system', () => {
  const cath = angiography({ leftHeart: true });
  it.each([
    { billing: 'professional', setting: 'hospital', patientClass: 'outpatient', expected: ['93458 x1 26'] },
    { billing: 'professional', setting: 'hospital', patientClass: 'inpatient', expected: ['93458 x1 26'] },
    { billing: 'professional', setting: 'office', patientClass: 'outpatient', expected: ['93458 x1'] },
    { billing: 'facility', setting: 'hospital', patientClass: 'outpatient', expected: ['93458 x1'] },
    { billing: 'facility', setting: 'hospital', patientClass: 'inpatient', expected: [] },
  ] as const)(`$billing, $setting, $patientClass → $expected — ${SRC.pc}`, ({ billing, setting, patientClass, expected }) => {
    const r = suggestCodes(input({ billing, setting, patientClass, cath }));
    expect(lines(r, 'CPT')).toEqual(expected);
  });

  it(`an inpatient facility claim says the catheterization needs ICD-10-PCS codes built by hand — ICD-10-PCS is the inpatient hospital procedure code set (CMS)`, () => {
    const r = suggestCodes(input({ billing: 'facility', patientClass: 'inpatient', cath }));
    expect(warningCodes(r)).toContain('inpatient-pcs-not-built');
  });

  it(`an unrecorded encounter blocks the review and applies no modifier 26 — ${SRC.pc}`, () => {
    const r = suggestCodes(input({ billing: null, setting: null, patientClass: null, cath }));
    expect(lines(r, 'CPT')).toEqual(['93458 x1']);
    const w = r.warnings.find((x) => x.code === 'encounter-not-recorded');
    expect(w?.blocking).toBe(true);
    expect(w?.message).toContain('patient class');
    expect(w?.message).toContain('billing context');
    expect(w?.message).toContain('setting');
  });

  it('a fully recorded encounter raises no encounter warning — common practice', () => {
    const r = suggestCodes(input({ cath }));
    expect(warningCodes(r)).not.toContain('encounter-not-recorded');
    expect(r.warnings.some((w) => w.blocking)).toBe(false);
  });
});
