import { describe, expect, it } from 'vitest';
import { analyzeStudy, type PhysiologyInput } from '../../../shared/physiology';

type Dose = NonNullable<PhysiologyInput['vasoreactivity']>['doses'][number];

const SRC = {
  covadis: 'COVADIS (Beltrame et al., EHJ 2017; Ong et al., IJC 2018); ESC 2024',
  endothelial: 'COVADIS for "not spasm"; the 20% constriction cut-off is from memory',
  practice: 'common practice',
  ceiling: 'ESC 2024 protocol figure (up to 200 µg into the left coronary); Japanese Circulation Society 2016 (20, 50 µg into the right coronary)',
  nitrates: 'ESC 2024 protocol figure (nitroglycerin after acetylcholine; nitrates stopped 24 h before)',
};

const dose = (constrictionPct: number, symptoms: boolean, ischemicEcg: boolean, micrograms = 100): Dose => ({
  vessel: 'LAD',
  micrograms,
  constrictionPct,
  symptoms,
  ischemicEcg,
});

function run(doses: Dose[], thresholds?: PhysiologyInput['thresholds']) {
  return analyzeStudy({ vessels: [], vasoreactivity: { doses }, ...(thresholds ? { thresholds } : {}) });
}

describe('one dose: the COVADIS table', () => {
  // Source: COVADIS (Beltrame et al., EHJ 2017; Ong et al., IJC 2018). The 20% lower edge of the middle
  // row is the lab's setting (endothelialDysfunctionPct), recalled from memory.
  //
  // | constriction | symptoms + ischaemic ECG | one of the two | neither                 |
  // | ≥ 90%        | epicardial spasm         | equivocal      | equivocal               |
  // | 20–89%       | microvascular spasm      | equivocal      | endothelial dysfunction |
  // | < 20%        | microvascular spasm      | equivocal      | negative                |
  const table = {
    '≥ 90%': { both: 'epicardial-spasm', one: 'equivocal', neither: 'equivocal' },
    '20–89%': { both: 'microvascular-spasm', one: 'equivocal', neither: 'endothelial-dysfunction' },
    '< 20%': { both: 'microvascular-spasm', one: 'equivocal', neither: 'negative' },
  } as const;
  const rows = { '≥ 90%': [90, 95, 100], '20–89%': [20, 50, 89, 89.9], '< 20%': [0, 10, 19, 19.9] } as const;
  const cases = (Object.keys(table) as (keyof typeof table)[]).flatMap((row) =>
    rows[row].flatMap((pct) => [
      { row, pct, s: true, e: true, result: table[row].both },
      { row, pct, s: true, e: false, result: table[row].one },
      { row, pct, s: false, e: true, result: table[row].one },
      { row, pct, s: false, e: false, result: table[row].neither },
    ]),
  );
  it.each(cases)(`$pct% ($row), symptoms $s, ischaemic ECG $e → $result — ${SRC.covadis}`, ({ pct, s, e, result }) => {
    const r = run([dose(pct, s, e)]);
    expect(r.vasoreactivity?.result).toBe(result);
    expect(r.doseResults?.[0].result).toBe(result);
  });

  it(`an equivocal dose says which criteria were missing — ${SRC.covadis}`, () => {
    const r = run([dose(95, true, false)]);
    const w = r.warnings.find((x) => x.code === 'spasm-criteria-not-met');
    expect(w?.message).toContain('95%');
    expect(w?.message).toContain('without ischaemic ECG changes');
    expect(w?.message).toContain('equivocal');
    expect(run([dose(95, true, true)]).warnings).toEqual([]);
  });
});

describe('dose warnings', () => {
  const rca = (micrograms: number): Dose => ({ ...dose(10, false, false, micrograms), vessel: 'RCA' });
  it.each([
    { d: rca(50), warn: false },
    { d: rca(80), warn: true },
    { d: { ...rca(80), vessel: 'PDA' } as Dose, warn: true },
    { d: dose(10, false, false, 100), warn: false },
    { d: dose(10, false, false, 200), warn: false },
    { d: dose(10, false, false, 250), warn: true },
  ])(`$d.micrograms µg into the $d.vessel → high-dose warning $warn — ${SRC.ceiling}`, ({ d, warn }) => {
    expect(run([d]).warnings.some((w) => w.code === 'ach-dose-high')).toBe(warn);
  });

  it(`nitrates before acetylcholine warn of a falsely negative test — ${SRC.nitrates}`, () => {
    const r = analyzeStudy({ vessels: [], vasoreactivity: { doses: [dose(10, false, false)] }, procedure: { nitratesBeforeAcetylcholine: true } });
    expect(r.warnings.map((w) => w.code)).toContain('nitrates-before-acetylcholine');
    const later = analyzeStudy({ vessels: [], vasoreactivity: { doses: [dose(10, false, false)] }, procedure: { nitratesBeforeAcetylcholine: false } });
    expect(later.warnings.map((w) => w.code)).not.toContain('nitrates-before-acetylcholine');
  });
});

describe('several doses: the most severe wins', () => {
  it.each([
    { doses: [dose(5, false, false, 2), dose(30, false, false, 20), dose(92, true, true, 100)], result: 'epicardial-spasm' },
    { doses: [dose(40, true, true, 20), dose(60, false, false, 100)], result: 'microvascular-spasm' },
    { doses: [dose(95, true, true, 100), dose(40, true, true, 200)], result: 'epicardial-spasm' },
    { doses: [dose(10, false, false, 2), dose(25, false, false, 20)], result: 'endothelial-dysfunction' },
    { doses: [dose(30, false, false, 20), dose(95, true, false, 100)], result: 'equivocal' },
    { doses: [dose(60, true, false, 20), dose(40, true, true, 100)], result: 'microvascular-spasm' },
    { doses: [dose(5, false, false, 2), dose(10, false, false, 20), dose(15, false, false, 100)], result: 'negative' },
  ] as const)(`→ $result — ${SRC.covadis}`, ({ doses, result }) => {
    expect(run([...doses]).vasoreactivity?.result).toBe(result);
  });

  it(`per-dose results are listed in input order — ${SRC.covadis}`, () => {
    const r = run([dose(10, false, false, 20), dose(92, true, true, 100)]);
    expect(r.doseResults?.map((d) => d.result)).toEqual(['negative', 'epicardial-spasm']);
    // The contract's vasoreactivity field holds exactly the outcome.
    expect(r.vasoreactivity).toEqual({ result: 'epicardial-spasm' });
  });
});

describe('reasons and thresholds', () => {
  it(`the study reason cites the dose and COVADIS — ${SRC.covadis}`, () => {
    const r = run([dose(92, true, true, 100)]);
    expect(r.reasons[0]).toBe(
      'Acetylcholine 100 µg into the LAD: 92% constriction with reproduced symptoms and ischaemic ECG changes meets the ≥ 90% criterion for epicardial spasm (COVADIS; ESC 2024).',
    );
  });

  it(`endothelial-dysfunction cut-off is the lab's setting — ${SRC.endothelial}`, () => {
    expect(run([dose(30, false, false)], { endothelialDysfunctionPct: 50 }).vasoreactivity?.result).toBe('negative');
    expect(run([dose(30, false, false)]).vasoreactivity?.result).toBe('endothelial-dysfunction');
  });

  it(`spasm cut-off is the lab's setting — ${SRC.covadis}`, () => {
    expect(run([dose(80, true, true)], { spasmConstrictionPct: 75 }).vasoreactivity?.result).toBe('epicardial-spasm');
  });

  it(`no doses → no vasoreactivity result at all — ${SRC.practice}`, () => {
    const r = run([]);
    expect(r.vasoreactivity).toBeUndefined();
    expect('vasoreactivity' in r).toBe(false);
    expect(r.findings.vasospasm).toBeNull();
    expect('vasoreactivity' in analyzeStudy({ vessels: [] })).toBe(false);
  });
});

describe('a constriction is printed in the band it was judged in — COVADIS (≥ 90% with symptoms and ischaemic ECG is epicardial spasm); common practice: judged as entered, never printed onto the cut-off', () => {
  it.each([
    { pct: 89.996, result: 'microvascular-spasm', text: 'with 89.996% constriction (below 90%)' },
    { pct: 89.6, result: 'microvascular-spasm', text: 'with 89.6% constriction (below 90%)' },
    { pct: 90, result: 'epicardial-spasm', text: '90% constriction with reproduced symptoms' },
  ])(`$pct% with symptoms and ECG changes → $result — ${SRC.covadis}`, ({ pct, result, text }) => {
    const r = run([dose(pct, true, true)]);
    expect(r.vasoreactivity?.result).toBe(result);
    expect(r.reasons[0]).toContain(text);
  });
  it(`19.996% without symptoms is negative and prints below 20% — ${SRC.endothelial}`, () => {
    const r = run([dose(19.996, false, false)]);
    expect(r.vasoreactivity?.result).toBe('negative');
    expect(r.reasons[0]).toContain('maximum constriction 19.996% (below 20%');
  });
});

describe('a dose above the ceiling is printed above it — ESC 2024 protocol figure (up to 200 µg into the left coronary); common practice: never printed onto the ceiling', () => {
  it.each([
    { micrograms: 200.4, warn: true, text: '(200.4 µg into the LAD) is above the usual maximum of 200 µg' },
    { micrograms: 201, warn: true, text: '(201 µg into the LAD) is above the usual maximum of 200 µg' },
    { micrograms: 200, warn: false, text: '' },
  ])(`$micrograms µg → warn $warn — ${SRC.ceiling}`, ({ micrograms, warn, text }) => {
    const w = run([dose(10, false, false, micrograms)]).warnings.find((x) => x.code === 'ach-dose-high');
    expect(w !== undefined).toBe(warn);
    if (warn) expect(w!.message).toContain(text);
  });
});
