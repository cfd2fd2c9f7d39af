import { describe, expect, it } from 'vitest';
import { formatQuantity } from '../../../shared/physiology/precision';
import { analyzeStudy, type PhysiologyInput, type VesselResult } from '../../../shared/physiology';

type VesselIn = PhysiologyInput['vessels'][number];

const SRC = {
  drift:
    'drift window 0.98–1.02 from memory; repeat when drift > 2 mmHg (interventional cardiology textbook; Cook et al., Circ Cardiovasc Interv 2016)',
  spread: 'from memory: repeat an injection differing from the others by more than ~30%',
  injections: 'from memory: three injections at rest and three at hyperaemia',
  practice: 'common practice',
  equalize: 'common practice: Pd/Pa reads 1.00 after equalizing',
  tolerance: 'common practice: about 2 mmHg, the usual drift allowance',
  ratioTolerance: 'common practice: resting ratios by different methods differ by 0.01–0.02',
  wedge: 'Layland et al., Heart 2012 (wedge correction needs Pw below Pd and Pa)',
  yong: 'Yong et al. via an interventional cardiology textbook chapter (correction formula)',
  cfr: 'EAPCI 2020 (CFR needs thermodilution at rest and at hyperaemia)',
  ach: 'ESC 2024 protocol figure (2, 20, 100, 200 µg)',
};

const three = (x: number) => [x, x, x];
const good = {
  rest: { pa: 100, pd: 95, tmn: three(0.9) },
  hyperemia: { pa: 95, pd: 80, tmn: three(0.3) },
};

function one(v: Partial<VesselIn>, extra: Partial<PhysiologyInput> = {}): VesselResult {
  return analyzeStudy({ vessels: [{ id: 'v1', vessel: 'LAD', ...good, ...v }], ...extra }).vessels[0];
}
const codes = (v: VesselResult) => v.warnings.map((w) => w.code);

describe('a clean measurement has no warnings', () => {
  it(`— ${SRC.practice}`, () => {
    expect(one({ driftPdPa: 1.0 }).warnings).toEqual([]);
  });
});

describe('drift-out-of-range', () => {
  it.each([
    { drift: 0.97, warn: true },
    { drift: 0.975, warn: true }, // shown 0.98, but 2.5 mmHg of drift at Pa 100: a check is judged as entered (Cook et al., Circ Cardiovasc Interv 2016: > 2 mmHg → repeat)
    { drift: 0.98, warn: false },
    { drift: 0.98, warn: false },
    { drift: 1.0, warn: false },
    { drift: 1.02, warn: false },
    { drift: 1.03, warn: true },
  ])(`drift Pd/Pa $drift → warn $warn — ${SRC.drift}`, ({ drift, warn }) => {
    const v = one({ driftPdPa: drift });
    expect(codes(v).includes('drift-out-of-range')).toBe(warn);
    if (warn) {
      const w = v.warnings.find((x) => x.code === 'drift-out-of-range');
      expect(w?.message).toContain('LAD');
      expect(w?.message).toContain(formatQuantity(drift, 'ratio'));
    }
  });

  it(`the window follows the lab's thresholds — ${SRC.drift}`, () => {
    expect(codes(one({ driftPdPa: 0.97 }, { thresholds: { driftLow: 0.97 } }))).not.toContain('drift-out-of-range');
  });
});

describe('injection-spread', () => {
  it(`an injection 67% above the mean of the other two is named with its set and number — ${SRC.spread}`, () => {
    const v = one({ hyperemia: { pa: 95, pd: 80, tmn: [0.3, 0.3, 0.5] } });
    const w = v.warnings.filter((x) => x.code === 'injection-spread');
    expect(w).toHaveLength(1);
    expect(w[0].message).toContain('hyperaemia injection 3');
    expect(w[0].message).toContain('LAD');
  });

  it.each([
    { tmn: [1.0, 1.0, 1.3], warn: false, note: 'exactly 30% above the others' },
    { tmn: [1.0, 1.0, 1.31], warn: true, note: '31% above the others' },
    { tmn: [1.0, 1.0, 0.7], warn: false, note: 'exactly 30% below the others' },
    { tmn: [1.0, 1.0, 0.69], warn: true, note: '31% below the others' },
  ])(`resting Tmn $tmn ($note) → warn $warn — ${SRC.spread}`, ({ tmn, warn }) => {
    const v = one({ rest: { pa: 100, pd: 95, tmn } });
    const w = v.warnings.filter((x) => x.code === 'injection-spread');
    expect(w.length > 0).toBe(warn);
    if (warn) expect(w[0].message).toContain('rest injection 3');
  });
});

describe('few-injections', () => {
  it.each([
    { n: 1, warn: true },
    { n: 2, warn: true },
    { n: 3, warn: false },
    { n: 4, warn: false },
  ])(`$n hyperaemic injections → warn $warn — ${SRC.injections}`, ({ n, warn }) => {
    const v = one({ hyperemia: { pa: 95, pd: 80, tmn: Array(n).fill(0.3) } });
    expect(codes(v).includes('few-injections')).toBe(warn);
  });

  it(`minInjections follows the lab's thresholds — ${SRC.injections}`, () => {
    const v = one({ rest: { pa: 100, pd: 95, tmn: [0.9, 0.9] } }, { thresholds: { minInjections: 2 } });
    expect(codes(v)).not.toContain('few-injections');
  });
});

describe('pd-above-pa (only beyond a tolerance of about 2 mmHg)', () => {
  it.each([
    { phase: 'rest', v: { rest: { pa: 100, pd: 102.5 } }, text: 'resting Pd 102.5 mmHg is above Pa 100 mmHg by more than 2 mmHg' },
    { phase: 'hyperaemia', v: { hyperemia: { pa: 90, pd: 93 } }, text: 'hyperaemic Pd 93 mmHg is above Pa 90 mmHg by more than 2 mmHg' },
  ])(`Pd above Pa at $phase — ${SRC.equalize}; ${SRC.tolerance}`, ({ v, text }) => {
    const r = one(v as Partial<VesselIn>);
    const w = r.warnings.find((x) => x.code === 'pd-above-pa');
    expect(w?.message).toContain(text);
  });

  it.each([
    { pd: 100, warn: false },
    { pd: 101, warn: false },
    { pd: 102, warn: false },
    { pd: 102.1, warn: true },
  ])(`resting Pa 100, Pd $pd → warn $warn — ${SRC.tolerance}`, ({ pd, warn }) => {
    expect(codes(one({ rest: { pa: 100, pd } })).includes('pd-above-pa')).toBe(warn);
  });

  it(`the tolerance is the lab's setting — ${SRC.tolerance}`, () => {
    expect(codes(one({ rest: { pa: 100, pd: 101 } }, { thresholds: { pdAbovePaToleranceMmHg: 0 } }))).toContain('pd-above-pa');
  });
});

describe('hyperemic-above-resting (only beyond 0.02)', () => {
  it.each([
    { hypPd: 95, warn: true },
    { hypPd: 93, warn: true },
    { hypPd: 92, warn: false },
    { hypPd: 90, warn: false },
    { hypPd: 85, warn: false },
  ])(`resting Pd/Pa 0.90, hyperaemic Pd $hypPd / 100 → warn $warn — ${SRC.ratioTolerance}`, ({ hypPd, warn }) => {
    const v = one({ rest: { pa: 100, pd: 90 }, hyperemia: { pa: 100, pd: hypPd } });
    expect(codes(v).includes('hyperemic-above-resting')).toBe(warn);
  });
});

describe('cfr-below-one', () => {
  it(`hyperaemic transit longer than resting (probably swapped sets) warns — ${SRC.practice}`, () => {
    const v = one({ rest: { pa: 100, pd: 95, tmn: three(0.3) }, hyperemia: { pa: 95, pd: 80, tmn: three(0.9) } });
    expect(v.cfr).toBeCloseTo(1 / 3, 10);
    expect(codes(v)).toContain('cfr-below-one');
    expect(codes(one({}))).not.toContain('cfr-below-one');
    // 0.995 is shown 1.00: not below 1.
    expect(codes(one({ rest: { pa: 100, pd: 95, tmn: three(0.995) }, hyperemia: { pa: 95, pd: 80, tmn: three(1) } }))).not.toContain('cfr-below-one');
  });
});

describe('hyperemia-inadequate', () => {
  const iv = { procedure: { hyperemicAgent: 'adenosine', hyperemicRoute: 'intravenous' } } as const;
  it.each([
    { restPa: 100, hypPa: 100, extra: iv, warn: true },
    { restPa: 100, hypPa: 104, extra: iv, warn: true },
    { restPa: 100, hypPa: 92, extra: iv, warn: false },
    { restPa: 100, hypPa: 100, extra: { procedure: { hyperemicAgent: 'adenosine', hyperemicRoute: 'intracoronary' } } as const, warn: false },
    { restPa: 100, hypPa: 100, extra: {}, warn: false },
  ])(`Pa $restPa → $hypPa mmHg → warn $warn — ${SRC.practice} (intravenous adenosine lowers aortic pressure)`, ({ restPa, hypPa, extra, warn }) => {
    const v = one({ rest: { pa: restPa, pd: restPa - 5 }, hyperemia: { pa: hypPa, pd: hypPa - 10 } }, extra as Partial<PhysiologyInput>);
    expect(codes(v).includes('hyperemia-inadequate')).toBe(warn);
  });
});

describe('transit times without pressures', () => {
  it(`CFR needs only the transit times of both states — ${SRC.cfr}`, () => {
    const r = analyzeStudy({ vessels: [{ id: 'v', vessel: 'LAD', rest: { tmn: three(0.9) }, hyperemia: { tmn: three(0.3) } }] }).vessels[0];
    expect(r.cfr).toBeCloseTo(3, 10);
    expect(r.imr).toBeUndefined();
    expect(r.rrr).toBeUndefined();
    expect(r.warnings.map((w) => w.code)).not.toContain('missing-rest');
  });
  it(`IMR needs the hyperaemic pressures as well — ${SRC.cfr}`, () => {
    const r = analyzeStudy({ vessels: [{ id: 'v', vessel: 'LAD', rest: { tmn: three(0.9) }, hyperemia: { pa: 100, pd: 90, tmn: three(0.3) } }] }).vessels[0];
    expect(r.imr).toBeCloseTo(27, 10);
    expect(r.cfr).toBeCloseTo(3, 10);
  });
});

describe('missing-rest / missing-hyperemia', () => {
  it(`hyperaemic Tmn without resting Tmn → no CFR, RRR, MRR; IMR still computed — ${SRC.cfr}`, () => {
    const v = one({ rest: { pa: 100, pd: 95 } });
    expect(codes(v)).toContain('missing-rest');
    expect(v.cfr).toBeUndefined();
    expect(v.rrr).toBeUndefined();
    expect(v.mrr).toBeUndefined();
    expect(v.imr).toBeDefined();
  });

  it(`hyperaemic Tmn with no resting data at all → missing-rest — ${SRC.cfr}`, () => {
    const r = analyzeStudy({ vessels: [{ id: 'v', vessel: 'LCX', hyperemia: { pa: 95, pd: 80, tmn: three(0.3) } }] });
    expect(codes(r.vessels[0])).toContain('missing-rest');
  });

  it(`resting Tmn without hyperaemic Tmn → missing-hyperemia, no CFR or IMR — ${SRC.cfr}`, () => {
    const v = one({ hyperemia: { pa: 95, pd: 80 } });
    expect(codes(v)).toContain('missing-hyperemia');
    expect(v.cfr).toBeUndefined();
    expect(v.imr).toBeUndefined();
  });

  it(`a resting-only study (pressures, no Tmn) is not missing anything — ${SRC.practice}`, () => {
    const r = analyzeStudy({ vessels: [{ id: 'v', vessel: 'LAD', rest: { pa: 100, pd: 95 } }] });
    expect(r.vessels[0].warnings).toEqual([]);
  });

  it(`an empty Tmn list is a set with no injection: nothing computed, and fewer than three is said — ${SRC.injections}`, () => {
    const v = one({ rest: { pa: 100, pd: 95, tmn: [] }, hyperemia: { pa: 95, pd: 80, tmn: [] } });
    expect(v.tmnRest).toBeUndefined();
    expect(v.cfr).toBeUndefined();
    expect(codes(v)).toEqual(['few-injections', 'few-injections']);
    expect(v.warnings[0].message).toContain('only 0 resting injections');
  });
});

describe('pd-pa-implausible (accepted with a warning)', () => {
  it.each([
    { what: 'resting Pd/Pa', v: { rest: { pa: 100, pd: 106 } } },
    { what: 'hyperaemic Pd/Pa', v: { rest: undefined, hyperemia: { pa: 100, pd: 106 } } },
    { what: 'entered FFR', v: { rest: undefined, hyperemia: undefined, ffr: 1.06 } },
    { what: 'entered diastolic resting ratio', v: { nhpr: { kind: 'diastolic', value: 1.1 } } },
  ])(`$what above 1.05 → warning, value kept — ${SRC.equalize}`, ({ what, v }) => {
    const r = one(v as Partial<VesselIn>);
    const w = r.warnings.find((x) => x.code === 'pd-pa-implausible');
    expect(w?.message).toContain(what);
  });

  it(`1.05 itself is accepted without this warning — ${SRC.equalize}`, () => {
    const v = one({ rest: undefined, hyperemia: undefined, ffr: 1.05 });
    expect(codes(v)).not.toContain('pd-pa-implausible');
    expect(v.ffr).toBe(1.05);
  });
});

describe('wedge-invalid', () => {
  it(`wedge pressure at or above Pd → not used; falls through to the correction without wedge — ${SRC.wedge}`, () => {
    const v = one({ hyperemia: { pa: 100, pd: 70, tmn: three(0.3) }, wedgePressure: 70 });
    expect(codes(v)).toContain('wedge-invalid');
    expect(v.imrMethod).toBe('yong');
  });

  it(`wedge pressure above Pd with normal FFR falls through to Pd × Tmn — ${SRC.wedge}`, () => {
    const v = one({ hyperemia: { pa: 100, pd: 90, tmn: three(0.3) }, wedgePressure: 95 });
    expect(codes(v)).toContain('wedge-invalid');
    expect(v.imrMethod).toBe('pd-tmn');
    expect(v.imr).toBeCloseTo(27, 10);
  });
});

describe('ffr-mismatch', () => {
  it.each([
    { entered: 0.85, warn: true },
    { entered: 0.83, warn: true },
    { entered: 0.82, warn: true }, // within 0.02 but on the other side of the 0.80 cut-off
    { entered: 0.79, warn: false },
    { entered: 0.78, warn: false },
    { entered: 0.77, warn: true },
  ])(`entered FFR $entered vs Pd/Pa 0.80 → warn $warn — ${SRC.practice}`, ({ entered, warn }) => {
    const v = one({ rest: undefined, hyperemia: { pa: 100, pd: 80 }, ffr: entered });
    expect(codes(v).includes('ffr-mismatch')).toBe(warn);
    expect(v.ffr).toBeCloseTo(0.8, 12);
  });
});

describe('imr-correction-invalid', () => {
  it(`Pd/Pa 0.20 gives no positive correction → no IMR reported, uncorrected kept — ${SRC.yong}`, () => {
    const v = one({ rest: undefined, hyperemia: { pa: 100, pd: 20, tmn: three(0.5) } });
    expect(codes(v)).toContain('imr-correction-invalid');
    expect(v.imr).toBeUndefined();
    expect(v.imrFlag).toBeUndefined();
    expect(v.imrMethod).toBeUndefined();
    expect(v.imrUncorrected).toBeCloseTo(10, 10);
  });
});

describe('warnings in a multi-vessel study name the vessel', () => {
  it(`two diagonals are told apart by id — ${SRC.practice}`, () => {
    const r = analyzeStudy({
      vessels: [
        { id: 'd1', vessel: 'DIAGONAL', driftPdPa: 0.9 },
        { id: 'd2', vessel: 'DIAGONAL', driftPdPa: 1.0 },
      ],
    });
    expect(r.vessels[0].warnings[0].message).toMatch(/^Diagonal \(d1\): /);
    expect(r.vessels[1].warnings).toEqual([]);
  });
});

describe('ach-dose-high (vasoreactivity warnings)', () => {
  it.each([
    { micrograms: 200, warn: false },
    { micrograms: 250, warn: true },
  ])(`acetylcholine $micrograms µg → warn $warn — ${SRC.ach}`, ({ micrograms, warn }) => {
    const r = analyzeStudy({
      vessels: [],
      vasoreactivity: { doses: [{ vessel: 'LAD', micrograms, constrictionPct: 10, symptoms: false, ischemicEcg: false }] },
    });
    expect(r.warnings.some((w) => w.code === 'ach-dose-high')).toBe(warn);
  });
});

describe('a warning never contradicts the numbers it prints — common practice: a value is judged at the precision it is printed, or printed with the decimals that carry its verdict', () => {
  it.each([
    // Judged as entered (Cook et al., Circ Cardiovasc Interv 2016: > 2 mmHg of drift → repeat); printed so the words agree.
    { drift: 0.975, shown: '0.975' },
    { drift: 1.0249, shown: '1.025' },
    { drift: 0.97999, shown: '0.97999' },
    { drift: 0.97, shown: '0.97' },
  ])(`drift $drift outside 0.98–1.02 prints $shown, never a value inside the window — ${SRC.drift}`, ({ drift, shown }) => {
    const w = one({ driftPdPa: drift }).warnings.find((x) => x.code === 'drift-out-of-range');
    expect(w?.message).toContain(`after pull-back was ${shown}, outside 0.98–1.02`);
  });

  it.each([
    // The spread printed as a whole percentage is judged as printed: 30.04% prints "30%", which is not more than 30%.
    { tmn: [1.0, 1.0, 1.3004], warn: false, pct: '30' },
    { tmn: [1.0, 1.0, 1.3049], warn: false, pct: '30' },
    { tmn: [1.0, 1.0, 1.305], warn: true, pct: '31' },
  ])(`resting Tmn $tmn → spread $pct%, warn $warn — ${SRC.spread}`, ({ tmn, warn, pct }) => {
    const w = one({ rest: { pa: 100, pd: 95, tmn } }).warnings.filter((x) => x.code === 'injection-spread');
    expect(w.length > 0).toBe(warn);
    if (warn) expect(w[0].message).toContain(`differs by ${pct}% from the mean of the other rest injections (1.00 s), more than 30%`);
  });

  it.each([
    // Resting Pd/Pa 93.44 / 100 prints 0.93; hyperaemic 95.45 / 100 prints 0.95: 0.02 apart as printed, not more.
    { hypPd: 95.45, warn: false },
    { hypPd: 95.5, warn: true }, // prints 0.96: 0.03 above 0.93
  ])(`resting Pd/Pa 0.9344, hyperaemic Pd $hypPd / 100 → warn $warn — ${SRC.ratioTolerance}`, ({ hypPd, warn }) => {
    const v = one({ rest: { pa: 100, pd: 93.44 }, hyperemia: { pa: 100, pd: hypPd } });
    expect(codes(v).includes('hyperemic-above-resting')).toBe(warn);
    if (warn) expect(v.warnings.find((x) => x.code === 'hyperemic-above-resting')?.message).toContain('hyperaemic Pd/Pa 0.96 is higher than resting Pd/Pa 0.93 by more than 0.02');
  });

  it.each([
    // Pd/Pa 84.9 / 100 prints 0.85; an entered 0.87 is 0.02 from it as printed (0.021 unrounded), both above 0.80.
    { entered: 0.87, warn: false },
    { entered: 0.88, warn: true },
  ])(`entered FFR $entered vs Pd/Pa 0.849 → warn $warn — ${SRC.practice}`, ({ entered, warn }) => {
    const v = one({ rest: undefined, hyperemia: { pa: 100, pd: 84.9 }, ffr: entered });
    expect(codes(v).includes('ffr-mismatch')).toBe(warn);
    if (warn) expect(v.warnings.find((x) => x.code === 'ffr-mismatch')?.message).toContain(`entered FFR ${entered.toFixed(2)} differs from hyperaemic Pd/Pa 0.85 by more than 0.02`);
  });
});
