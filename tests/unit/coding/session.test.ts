import { describe, expect, it } from 'vitest';
import { chooseCodeSets, releaseOf, suggestCodes } from '../../../shared/coding';
import { angiography, input, warningCodes } from './fixtures';

const SRC = {
  releases: 'CPT and HCPCS releases take effect 1 January; ICD-10-CM and ICD-10-PCS on 1 October of the preceding calendar year (CMS)',
  fy2024: 'CMS ICD-10-CM FY2024 addenda: I20.81 and I25.85 new, effective 1 October 2023',
  cathPci: 'CPT coronary intervention guidelines and CMS NCCI policy manual chapter 11: diagnostic angiography with an intervention only without a prior study, with an inadequate one, or after a change in condition; modifier 59/XU [memory]',
  provocation: 'CPT 93463 aimed at pulmonary vasoreactivity, not with coronary interventions (coding article citing CPT); no dedicated code for acetylcholine testing found',
};

describe('the code-set release follows the date of service', () => {
  it.each([
    { date: '2024-06-15', system: 'CPT', release: 2024 },
    { date: '2025-01-01', system: 'CPT', release: 2025 },
    { date: '2024-09-30', system: 'ICD-10-CM', release: 2024 },
    { date: '2024-10-01', system: 'ICD-10-CM', release: 2025 },
    { date: '2025-10-01', system: 'ICD-10-PCS', release: 2026 },
  ] as const)(`$date → $system $release — ${SRC.releases}`, ({ date, system, release }) => {
    expect(releaseOf(system, date)).toBe(release);
    const sets = chooseCodeSets(date);
    expect(sets[system].year).toBe(release);
    expect(sets[system].encoded).toBe(true);
    expect(sets.basis).toBe('date-of-service');
  });

  it(`a date within the encoded releases raises no release warning — ${SRC.releases}`, () => {
    const r = suggestCodes(input({ dateOfService: '2025-03-10', cath: angiography() }));
    expect(warningCodes(r)).not.toContain('code-set-after-encoded');
    expect(warningCodes(r)).not.toContain('code-set-before-encoded');
    expect(r.codes.find((c) => c.code === '93454')?.codeSet).toBe('CPT 2025');
    expect(r.codeSets['ICD-10-CM'].label).toBe('ICD-10-CM FY2025');
  });

  it(`a date after the encoded releases is coded with the latest one and warned — ${SRC.releases}`, () => {
    const r = suggestCodes(input({ dateOfService: '2026-12-02', cath: angiography() }));
    expect(r.codeSets.CPT).toEqual({ year: 2025, label: 'CPT 2025', encoded: false });
    expect(r.codeSets['ICD-10-CM']).toEqual({ year: 2026, label: 'ICD-10-CM FY2026', encoded: false });
    const w = r.warnings.find((x) => x.code === 'code-set-after-encoded');
    expect(w?.message).toContain('CPT 2026');
    expect(w?.message).toContain('ICD-10-CM FY2027');
  });

  it(`a date in CPT 2026 with interventions adds the intervention caution — ${SRC.releases}; coding publications summarising CPT 2026 report new coronary intervention codes (not checked against the code set)`, () => {
    const r = suggestCodes(input({ dateOfService: '2026-02-01', pci: [{ vessel: 'LAD', kind: 'stent' }] }));
    const w = r.warnings.find((x) => x.code === 'code-set-after-encoded');
    expect(w?.message).toContain('CPT 2026');
    expect(w?.message).toContain('intervention');
    expect(w?.message).toContain('these rules do not encode it');
    expect(w?.message).not.toContain('ICD-10-CM FY2027'); // February 2026 is still FY2026
  });

  it(`a date before the encoded releases is warned — ${SRC.releases}`, () => {
    const r = suggestCodes(input({ dateOfService: '2023-05-01', cath: angiography() }));
    expect(warningCodes(r)).toContain('code-set-before-encoded');
    expect(r.codeSets.CPT).toEqual({ year: 2024, label: 'CPT 2024', encoded: false });
  });

  it(`a diagnosis code newer than the date of service is not suggested — ${SRC.fy2024}`, () => {
    const before = suggestCodes(input({ dateOfService: '2023-09-30', diagnoses: { obstructiveCad: false, angina: true, microvascularDysfunction: true, vasospasm: null } }));
    expect(before.codes.some((c) => c.code === 'I20.81')).toBe(false);
    expect(before.warnings.find((w) => w.code === 'code-not-in-release')?.message).toContain('I20.81');
    const after = suggestCodes(input({ dateOfService: '2023-10-01', diagnoses: { obstructiveCad: false, angina: true, microvascularDysfunction: true, vasospasm: null } }));
    expect(after.codes.some((c) => c.code === 'I20.81')).toBe(true);
  });

  it(`no date given: the latest encoded releases, said in the result — ${SRC.releases}`, () => {
    const r = suggestCodes(input());
    expect(r.codeSets.basis).toBe('latest-encoded');
    expect(r.codeSets.dateOfService).toBeNull();
    expect(warningCodes(r)).not.toContain('date-of-service-missing');
  });

  it(`a study without a procedure date (null) is warned — ${SRC.releases}`, () => {
    const r = suggestCodes(input({ dateOfService: null }));
    expect(warningCodes(r)).toContain('date-of-service-missing');
  });
});

describe('diagnostic catheterization and intervention in one session', () => {
  it(`both are suggested and the coder is told when both may be reported — ${SRC.cathPci}`, () => {
    const r = suggestCodes(input({ cath: angiography({ leftHeart: true }), pci: [{ vessel: 'LAD', kind: 'stent' }] }));
    expect(r.codes.map((c) => c.code)).toEqual(expect.arrayContaining(['93458', '92928']));
    const w = r.warnings.find((x) => x.code === 'cath-with-pci');
    expect(w?.message).toContain('no prior diagnostic study');
    expect(w?.message).toContain('59');
    expect(w?.message).toContain('[memory]');
  });

  it(`no warning with the catheterization alone or the intervention alone — ${SRC.cathPci}`, () => {
    expect(warningCodes(suggestCodes(input({ cath: angiography() })))).not.toContain('cath-with-pci');
    expect(warningCodes(suggestCodes(input({ pci: [{ vessel: 'LAD', kind: 'stent' }] })))).not.toContain('cath-with-pci');
  });
});

describe('provocation testing', () => {
  it.each(['acetylcholine', 'ergonovine'] as const)(`%s: no code, and the reason — ${SRC.provocation}`, (agent) => {
    const r = suggestCodes(input({ cath: angiography(), vasoreactivity: { agent, vessel: 'LAD' } }));
    expect(r.codes.some((c) => c.code === '93463')).toBe(false);
    const w = r.warnings.find((x) => x.code === 'provocation-no-code');
    expect(w?.message).toContain('93463');
    expect(w?.message).toContain('pulmonary vasoreactivity');
    expect(w?.message.toLowerCase()).toContain(agent);
  });
});

describe('the encounter', () => {
  it.each([
    { billing: 'facility', setting: 'office', patientClass: 'outpatient', code: 'facility-in-office' },
    { billing: 'professional', setting: 'office', patientClass: 'inpatient', code: 'inpatient-in-office' },
  ] as const)(`$billing in $setting for an $patientClass → $code — common practice`, ({ billing, setting, patientClass, code }) => {
    expect(warningCodes(suggestCodes(input({ billing, setting, patientClass })))).toContain(code);
  });
});

describe('the caution', () => {
  it('the result and every code line carry it — product caution: code suggestions are for a certified coder under current code-set rules and payer policy (common practice)', () => {
    const r = suggestCodes(input({ cath: angiography(), physiology: [{ vessel: 'LAD', measured: ['ffr'], hyperemicAgent: true }] }));
    expect(r.caution).toMatch(/verify against current code-set rules and payer policy/);
    expect(r.caution).toMatch(/certified coder/);
    expect(r.codes.length).toBeGreaterThan(1);
    for (const c of r.codes) expect(c.caution).toBe(r.caution);
  });
});

describe('notes from the mapping reach the coder', () => {
  it('a note becomes a warning, keeping its blocking flag — common practice', () => {
    const r = suggestCodes(input({ notes: [{ code: 'cath-not-recorded', message: 'Not recorded.', blocking: true }] }));
    expect(r.warnings).toContainEqual({ code: 'cath-not-recorded', message: 'Not recorded.', blocking: true });
  });
});
