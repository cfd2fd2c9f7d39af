import { describe, expect, it } from 'vitest';
import { analyzeStudy, type PhysiologyInput } from '../../../shared/physiology';

type Dose = NonNullable<PhysiologyInput['vasoreactivity']>['doses'][number];

const SRC = {
  covadis: 'COVADIS (Beltrame et al., EHJ 2017; Ong et al., IJC 2018); ESC 2024',
  endothelial: 'COVADIS for "not spasm"; the 20% constriction cut-off is from memory',
  practice: 'common practice',
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

describe('one dose', () => {
  it.each([
    { pct: 90, s: true, e: true, result: 'epicardial-spasm', source: SRC.covadis },
    { pct: 100, s: true, e: true, result: 'epicardial-spasm', source: SRC.covadis },
    { pct: 89, s: true, e: true, result: 'microvascular-spasm', source: SRC.covadis },
    { pct: 0, s: true, e: true, result: 'microvascular-spasm', source: SRC.covadis },
    { pct: 95, s: true, e: false, result: 'endothelial-dysfunction', source: SRC.covadis },
    { pct: 95, s: false, e: true, result: 'endothelial-dysfunction', source: SRC.covadis },
    { pct: 95, s: false, e: false, result: 'endothelial-dysfunction', source: SRC.covadis },
    { pct: 50, s: false, e: false, result: 'endothelial-dysfunction', source: SRC.endothelial },
    { pct: 20, s: true, e: false, result: 'endothelial-dysfunction', source: SRC.endothelial },
    { pct: 19, s: false, e: false, result: 'negative', source: SRC.endothelial },
    { pct: 0, s: false, e: true, result: 'negative', source: SRC.covadis },
    { pct: 10, s: true, e: false, result: 'negative', source: SRC.covadis },
  ] as const)('$pct% constriction, symptoms $s, ischaemic ECG $e → $result — $source', ({ pct, s, e, result }) => {
    const r = run([dose(pct, s, e)]);
    expect(r.vasoreactivity?.result).toBe(result);
    expect(r.doseResults?.[0].result).toBe(result);
  });

  it(`≥ 90% without symptoms and ECG change warns that it is not COVADIS epicardial spasm — ${SRC.covadis}`, () => {
    const r = run([dose(95, true, false)]);
    const w = r.warnings.find((x) => x.code === 'spasm-criteria-not-met');
    expect(w?.message).toContain('COVADIS');
    expect(w?.message).toContain('95%');
    expect(run([dose(95, true, true)]).warnings).toEqual([]);
  });
});

describe('several doses: the most severe wins', () => {
  it.each([
    { doses: [dose(5, false, false, 2), dose(30, false, false, 20), dose(92, true, true, 100)], result: 'epicardial-spasm' },
    { doses: [dose(40, true, true, 20), dose(60, false, false, 100)], result: 'microvascular-spasm' },
    { doses: [dose(95, true, true, 100), dose(40, true, true, 200)], result: 'epicardial-spasm' },
    { doses: [dose(10, false, false, 2), dose(25, false, false, 20)], result: 'endothelial-dysfunction' },
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
