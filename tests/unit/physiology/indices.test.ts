import { describe, expect, it } from 'vitest';
import {
  analyzeStudy,
  defaultThresholds,
  formatQuantity,
  thresholdSources,
  type PhysiologyInput,
  type VesselResult,
} from '../../../shared/physiology';

type VesselIn = PhysiologyInput['vessels'][number];

const SRC = {
  precision: 'common practice: an index is judged at the precision it is displayed and reported (ratios 2 decimals, IMR whole number)',
  caseA: 'hand-computed from the published formulas (FFR = Pd/Pa, Pijls et al., NEJM 1996; CFR = Tmn rest / Tmn hyp, EAPCI 2020; IMR with the Yong correction, Yong et al.; RRR, Lee et al., JAHA 2020; MRR, De Bruyne et al. 2021) — not a worked example from a paper',
  ffr: 'ESC 2024 chronic coronary syndromes guideline; EAPCI 2020; FAME (FFR ≤ 0.80)',
  grey: 'DEFER/FAME history, Interv Cardiol Rev 2016 (grey zone 0.76–0.80)',
  restPdPa: 'CONTRAST (whole-cycle resting Pd/Pa ≤ 0.91)',
  diastolic: 'DEFINE-FLAIR and the SWEDEHEART-based trial, 2017; EAPCI 2020 (≤ 0.89)',
  fullCycle: 'validation studies summarised in an Open Heart review; EAPCI 2020 (≤ 0.89)',
  cfr: 'EAPCI 2020 (thermodilution CFR < 2.0)',
  cfrBand: 'EAPCI 2020 (< 2.0 for thermodilution); COVADIS allows ≤ 2.0–2.5, so a lab may set the cut-off within that range (ESC 2024 uses < 2.5)',
  imr: 'ESC 2024; EAPCI 2020 (IMR ≥ 25)',
  imrFormula: 'hand-computed from the formula IMR = Pd × Tmn (ESC 2024; EAPCI 2020)',
  wedge: 'hand-computed from the formula in Layland et al., Heart 2012',
  yong: 'hand-computed from the formula of Yong et al. (interventional cardiology textbook chapter on microvascular assessment)',
  rrr: 'hand-computed from the formula in Lee et al., JAHA 2020; cut-off 2.0 from memory (CorMicA)',
  mrr: 'hand-computed from the formula in De Bruyne et al. 2021; cut-off 2.7 from ESC 2024',
  cfrFormula: 'hand-computed from the formula CFR = Tmn rest / Tmn hyperaemia (EAPCI 2020)',
  practice: 'common practice',
};

const three = (x: number) => [x, x, x];

function one(v: Partial<VesselIn>, extra: Partial<PhysiologyInput> = {}): VesselResult {
  return analyzeStudy({ vessels: [{ id: 'v1', vessel: 'LAD', ...v }], ...extra }).vessels[0];
}

describe('check case A', () => {
  // Source: hand-computed from the published formulas (FFR = Pd/Pa, Pijls et al., NEJM 1996; CFR = Tmn rest / Tmn hyp, EAPCI 2020; IMR with the Yong correction, Yong et al.; RRR, Lee et al., JAHA 2020; MRR, De Bruyne et al. 2021) — not a worked example from a paper.
  const r = analyzeStudy({
    vessels: [
      {
        id: 'a',
        vessel: 'LAD',
        rest: { pa: 100, pd: 95, tmn: three(0.9) },
        hyperemia: { pa: 90, pd: 72, tmn: three(0.3) },
      },
    ],
  });
  const v = r.vessels[0];

  it.each([
    ['ffr', 0.8],
    ['restingPdPa', 0.95],
    ['tmnRest', 0.9],
    ['tmnHyperemia', 0.3],
    ['cfr', 3.0],
    ['imr', 20.52],
    ['imrUncorrected', 21.6],
    ['rrr', 3.958333333333333],
    ['mrr', 4.166666666666667],
  ] as const)(`%s = %s — ${SRC.caseA}`, (key, expected) => {
    expect(v[key]).toBeCloseTo(expected, 10);
  });

  it(`flags and method — ${SRC.caseA}`, () => {
    expect(v.ffrFlag).toBe('abnormal');
    expect(v.ffrSource).toBe('pressures');
    expect(v.restingPdPaFlag).toBe('normal');
    expect(v.cfrFlag).toBe('normal');
    expect(v.imrMethod).toBe('yong');
    expect(v.imrFlag).toBe('normal');
    expect(v.rrrFlag).toBe('normal');
    expect(v.mrrFlag).toBe('normal');
    expect(v.warnings).toEqual([]);
    expect(r.findings).toEqual({ obstructive: true, microvascular: null, microvascularDysfunction: false, endothelialDysfunction: false, vasospasm: null });
    expect(r.endotype).toBe('obstructive');
  });

  it(`reason sentence cites value, cut-off and source — ${SRC.caseA}; ${SRC.ffr}`, () => {
    expect(r.reasons).toContain(
      'LAD: FFR 0.80 is at or below the 0.80 cut-off (ESC 2024) — a haemodynamically significant stenosis.',
    );
    expect(r.reasons.at(-1)).toMatch(/^Endotype: obstructive/);
  });
});

describe('FFR boundaries', () => {
  it.each([
    { pd: 80, ffr: 0.8, flag: 'abnormal', grey: true, source: SRC.ffr },
    { pd: 79, ffr: 0.79, flag: 'abnormal', grey: true, source: SRC.ffr },
    { pd: 81, ffr: 0.81, flag: 'normal', grey: undefined, source: SRC.ffr },
    { pd: 76, ffr: 0.76, flag: 'abnormal', grey: true, source: SRC.grey },
    { pd: 75, ffr: 0.75, flag: 'abnormal', grey: undefined, source: SRC.grey },
    { pd: 74, ffr: 0.74, flag: 'abnormal', grey: undefined, source: SRC.grey },
  ])('hyperaemic Pd $pd / Pa 100 → FFR $ffr $flag — $source', ({ pd, ffr, flag, grey }) => {
    const v = one({ hyperemia: { pa: 100, pd } });
    expect(v.ffr).toBeCloseTo(ffr, 12);
    expect(v.ffrFlag).toBe(flag);
    expect(v.ffrGreyZone).toBe(grey);
  });

  it.each([
    { ffr: 0.8, flag: 'abnormal', source: SRC.ffr },
    { ffr: 0.79, flag: 'abnormal', source: SRC.ffr },
    { ffr: 0.81, flag: 'normal', source: SRC.ffr },
  ])('entered console FFR $ffr → $flag — $source', ({ ffr, flag }) => {
    const v = one({ ffr });
    expect(v.ffr).toBe(ffr);
    expect(v.ffrSource).toBe('entered');
    expect(v.ffrFlag).toBe(flag);
  });

  it(`grey zone adds a reason but keeps the flag abnormal — ${SRC.grey}`, () => {
    const r = analyzeStudy({ vessels: [{ id: 'v', vessel: 'LAD', hyperemia: { pa: 100, pd: 78 } }] });
    expect(r.vessels[0].ffrFlag).toBe('abnormal');
    expect(r.reasons.some((s) => s.includes('0.76–0.80 grey zone'))).toBe(true);
  });

  // The band 0.76–0.80, both ends included, judged by the one precision rule (two decimals), like the flag.
  it.each([
    { pd: 75, ffr: '0.75', grey: undefined, flag: 'abnormal' },
    { pd: 75.4, ffr: '0.75', grey: undefined, flag: 'abnormal' },
    { pd: 75.5, ffr: '0.76', grey: true, flag: 'abnormal' },
    { pd: 76, ffr: '0.76', grey: true, flag: 'abnormal' },
    { pd: 80, ffr: '0.80', grey: true, flag: 'abnormal' },
    { pd: 80.4, ffr: '0.80', grey: true, flag: 'abnormal' },
    { pd: 80.5, ffr: '0.81', grey: undefined, flag: 'normal' },
    { pd: 81, ffr: '0.81', grey: undefined, flag: 'normal' },
  ])(`FFR $pd / 100 shown $ffr: grey zone $grey, flag $flag — ${SRC.grey}; ESC 2024 (FFR ≤ 0.80)`, ({ pd, ffr, grey, flag }) => {
    const r = analyzeStudy({ vessels: [{ id: 'v', vessel: 'LAD', hyperemia: { pa: 100, pd } }] });
    const v = r.vessels[0];
    expect(formatQuantity(v.ffr!, 'ratio')).toBe(ffr);
    expect(v.ffrGreyZone).toBe(grey);
    expect(v.ffrFlag).toBe(flag);
    expect(r.reasons.some((s) => s.includes(`FFR ${ffr} lies in the 0.76–0.80 grey zone`))).toBe(grey === true);
  });

  it(`pressures win over an entered FFR within 0.02 on the same side of the cut-off — ${SRC.practice}`, () => {
    const v = one({ ffr: 0.79, hyperemia: { pa: 100, pd: 80 } });
    expect(v.ffr).toBeCloseTo(0.8, 12);
    expect(v.ffrSource).toBe('pressures');
    expect(v.warnings).toEqual([]);
  });

  it(`an entered FFR on the other side of the cut-off is always said, and qualifies the headline — ${SRC.practice}`, () => {
    // Console 0.80 (abnormal) against typed means 65/80 = 0.8125 → 0.81 (normal): only 0.0125 apart.
    const r = analyzeStudy({ vessels: [{ id: 'v', vessel: 'LAD', ffr: 0.8, hyperemia: { pa: 80, pd: 65 } }] });
    expect(r.vessels[0].warnings.map((w) => w.code)).toContain('ffr-mismatch');
    expect(r.headline).toMatch(/caution: quality check failed in LAD/);
  });
});

describe('resting indices', () => {
  it.each([
    { pd: 91, value: 0.91, flag: 'abnormal' },
    { pd: 90, value: 0.9, flag: 'abnormal' },
    { pd: 92, value: 0.92, flag: 'normal' },
  ])(`resting whole-cycle Pd/Pa: Pd $pd / Pa 100 → $flag — ${SRC.restPdPa}`, ({ pd, value, flag }) => {
    const v = one({ rest: { pa: 100, pd } });
    expect(v.restingPdPa).toBeCloseTo(value, 12);
    expect(v.restingPdPaFlag).toBe(flag);
  });

  it.each([
    { kind: 'whole-cycle', value: 0.91, flag: 'abnormal', source: SRC.restPdPa },
    { kind: 'whole-cycle', value: 0.9, flag: 'abnormal', source: SRC.restPdPa },
    { kind: 'whole-cycle', value: 0.92, flag: 'normal', source: SRC.restPdPa },
    { kind: 'diastolic', value: 0.89, flag: 'abnormal', source: SRC.diastolic },
    { kind: 'diastolic', value: 0.88, flag: 'abnormal', source: SRC.diastolic },
    { kind: 'diastolic', value: 0.9, flag: 'normal', source: SRC.diastolic },
    { kind: 'full-cycle-minimum', value: 0.89, flag: 'abnormal', source: SRC.fullCycle },
    { kind: 'full-cycle-minimum', value: 0.88, flag: 'abnormal', source: SRC.fullCycle },
    { kind: 'full-cycle-minimum', value: 0.9, flag: 'normal', source: SRC.fullCycle },
  ] as const)('$kind resting ratio $value → $flag — $source', ({ kind, value, flag }) => {
    const v = one({ nhpr: { kind, value } });
    expect(v.nhpr).toBe(value);
    expect(v.nhprKind).toBe(kind);
    expect(v.nhprFlag).toBe(flag);
  });
});

describe('CFR', () => {
  it.each([
    { rest: 0.995, cfr: 1.99, flag: 'abnormal', source: SRC.cfr },
    { rest: 1.0, cfr: 2.0, flag: 'normal', source: SRC.cfr },
    { rest: 1.005, cfr: 2.01, flag: 'normal', source: SRC.cfr },
    { rest: 1.245, cfr: 2.49, flag: 'normal', source: SRC.cfr },
  ])('Tmn rest $rest s / hyperaemia 0.5 s → CFR $cfr $flag — $source', ({ rest, cfr, flag }) => {
    const v = one({ rest: { pa: 100, pd: 95, tmn: three(rest) }, hyperemia: { pa: 100, pd: 90, tmn: three(0.5) } });
    expect(v.cfr).toBeCloseTo(cfr, 10);
    expect(v.cfrFlag).toBe(flag);
  });

  it.each([
    { rest: 0.995, cfr: 1.99, flag: 'abnormal' },
    { rest: 1.0, cfr: 2.0, flag: 'borderline' },
    { rest: 1.245, cfr: 2.49, flag: 'borderline' },
    { rest: 1.25, cfr: 2.5, flag: 'normal' },
  ])(`a lab that sets a borderline band up to 2.5: CFR $cfr → $flag — ${SRC.cfrBand}`, ({ rest, cfr, flag }) => {
    const v = analyzeStudy({
      vessels: [{ id: 'v1', vessel: 'LAD', rest: { pa: 100, pd: 95, tmn: three(rest) }, hyperemia: { pa: 100, pd: 90, tmn: three(0.5) } }],
      thresholds: { cfrBorderline: 2.5 },
    }).vessels[0];
    expect(v.cfr).toBeCloseTo(cfr, 10);
    expect(v.cfrFlag).toBe(flag);
  });

  it(`a lab cut-off of 2.5 makes CFR 2.2 abnormal — ${SRC.cfrBand}`, () => {
    const v = analyzeStudy({
      vessels: [{ id: 'v1', vessel: 'LAD', rest: { pa: 100, pd: 95, tmn: three(1.1) }, hyperemia: { pa: 100, pd: 90, tmn: three(0.5) } }],
      thresholds: { cfr: 2.5 },
    }).vessels[0];
    expect(v.cfrFlag).toBe('abnormal');
  });

  it(`a mean of three 0.6 s over three 0.3 s is CFR 2.0, not below it — ${SRC.cfrFormula}`, () => {
    // 0.6 + 0.6 + 0.6 is 1.7999999999999998 in binary floating point.
    const v = one({ rest: { pa: 100, pd: 95, tmn: three(0.6) }, hyperemia: { pa: 100, pd: 90, tmn: three(0.3) } });
    expect(v.cfr).toBeCloseTo(2.0, 12);
    expect(v.cfrFlag).toBe('normal');
  });

  it(`means of unequal injections — ${SRC.cfrFormula}`, () => {
    const v = one({
      rest: { pa: 100, pd: 95, tmn: [0.8, 0.9, 1.0] },
      hyperemia: { pa: 100, pd: 90, tmn: [0.25, 0.3, 0.35] },
    });
    expect(v.tmnRest).toBeCloseTo(0.9, 12);
    expect(v.tmnHyperemia).toBeCloseTo(0.3, 12);
    expect(v.cfr).toBeCloseTo(3.0, 10);
  });

  it(`equal CFR cut-off and borderline limit disable the band — ${SRC.cfrBand}`, () => {
    const v = one(
      { rest: { pa: 100, pd: 95, tmn: three(1.15) }, hyperemia: { pa: 100, pd: 90, tmn: three(0.5) } },
      { thresholds: { cfr: 2.0, cfrBorderline: 2.0 } },
    );
    expect(v.cfr).toBeCloseTo(2.3, 10);
    expect(v.cfrFlag).toBe('normal');
  });
});

describe('IMR', () => {
  // Pa 110 keeps FFR normal (> 0.80), so IMR = Pd × Tmn. IMR is judged as the whole number it is
  // reported as (common practice: a flag never contradicts the printed value): 24.49 → 24, 24.9 → 25.
  it.each([
    { pd: 97.96, imr: 24.49, flag: 'normal' },
    { pd: 98, imr: 24.5, flag: 'abnormal' },
    { pd: 99.6, imr: 24.9, flag: 'abnormal' },
    { pd: 100, imr: 25, flag: 'abnormal' },
    { pd: 100.4, imr: 25.1, flag: 'abnormal' },
  ])(`Pd $pd × Tmn 0.25 → IMR $imr $flag (pd-tmn) — ${SRC.imrFormula}; ${SRC.imr}`, ({ pd, imr, flag }) => {
    const v = one({ hyperemia: { pa: 110, pd, tmn: three(0.25) } });
    expect(v.imrMethod).toBe('pd-tmn');
    expect(v.imr).toBeCloseTo(imr, 10);
    expect(v.imrUncorrected).toBeCloseTo(imr, 10);
    expect(v.imrFlag).toBe(flag);
  });

  it(`Pd 81 × Tmn 0.3 = 24.3 is normal, with the mean of three 0.3 s injections — ${SRC.imrFormula}`, () => {
    const v = one({ hyperemia: { pa: 100, pd: 81, tmn: three(0.3) } });
    expect(v.imr).toBeCloseTo(24.3, 10);
    expect(v.imrFlag).toBe('normal');
  });

  it(`wedge-corrected: Pa 100, Pd 70, Pw 20, Tmn 0.3 → 100 × 0.3 × 50/80 = 18.75 — ${SRC.wedge}`, () => {
    const v = one({ hyperemia: { pa: 100, pd: 70, tmn: three(0.3) }, wedgePressure: 20 });
    expect(v.imrMethod).toBe('wedge');
    expect(v.imr).toBeCloseTo(18.75, 10);
    expect(v.imrUncorrected).toBeCloseTo(21, 10);
    expect(v.imrFlag).toBe('normal');
  });

  it(`wedge-corrected is used even when FFR is normal: Pa 100, Pd 90, Pw 10, Tmn 0.4 → 40 × 80/90 — ${SRC.wedge}`, () => {
    const v = one({ hyperemia: { pa: 100, pd: 90, tmn: three(0.4) }, wedgePressure: 10 });
    expect(v.imrMethod).toBe('wedge');
    expect(v.imr).toBeCloseTo((100 * 0.4 * 80) / 90, 10);
    expect(v.imrFlag).toBe('abnormal');
  });

  it(`a wedge pressure near 0 reduces to Pd × Tmn — ${SRC.wedge}`, () => {
    const v = one({ hyperemia: { pa: 100, pd: 90, tmn: three(0.3) }, wedgePressure: 0.001 });
    expect(v.imrMethod).toBe('wedge');
    expect(v.imr).toBeCloseTo(27, 3);
  });

  it(`corrected without wedge when FFR ≤ 0.80: Pa 100, Pd 60, Tmn 0.5 → 50 × (0.81 − 0.32) = 24.5, reported 25 — ${SRC.yong}`, () => {
    const v = one({ hyperemia: { pa: 100, pd: 60, tmn: three(0.5) } });
    expect(v.ffrFlag).toBe('abnormal');
    expect(v.imrMethod).toBe('yong');
    expect(v.imr).toBeCloseTo(24.5, 10);
    expect(v.imrFlag).toBe('abnormal');
    expect(v.imrUncorrected).toBeCloseTo(30, 10);
    const lower = one({ hyperemia: { pa: 100, pd: 60, tmn: three(0.4) } }); // 40 × 0.49 = 19.6 → 20
    expect(lower.imr).toBeCloseTo(19.6, 10);
    expect(lower.imrFlag).toBe('normal');
  });

  it(`FFR exactly 0.80 takes the correction; 0.81 does not — ${SRC.yong}; ${SRC.ffr}`, () => {
    expect(one({ hyperemia: { pa: 100, pd: 80, tmn: three(0.4) } }).imrMethod).toBe('yong');
    expect(one({ hyperemia: { pa: 100, pd: 81, tmn: three(0.4) } }).imrMethod).toBe('pd-tmn');
  });

  it(`no IMR without hyperaemic transit times — ${SRC.imrFormula}`, () => {
    const v = one({ hyperemia: { pa: 100, pd: 90 } });
    expect(v.imr).toBeUndefined();
    expect(v.imrUncorrected).toBeUndefined();
    expect(v.imrMethod).toBeUndefined();
    expect(v.imrFlag).toBeUndefined();
  });
});

describe('RRR and MRR', () => {
  // CFR 2.0 (Tmn 1.0 / 0.5); RRR = CFR × Pd rest / Pd hyp.
  it.each([
    { restPd: 89.55, rrr: 1.99, flag: 'abnormal' },
    { restPd: 90, rrr: 2.0, flag: 'normal' },
    { restPd: 90.45, rrr: 2.01, flag: 'normal' },
  ])(`RRR: CFR 2.0 × Pd $restPd / 90 = $rrr → $flag — ${SRC.rrr}`, ({ restPd, rrr, flag }) => {
    const v = one({
      rest: { pa: 100, pd: restPd, tmn: three(1.0) },
      hyperemia: { pa: 100, pd: 90, tmn: three(0.5) },
    });
    expect(v.rrr).toBeCloseTo(rrr, 10);
    expect(v.rrrFlag).toBe(flag);
  });

  // CFR 2.0, FFR 0.80 → CFR/FFR 2.5; MRR = 2.5 × Pa rest / Pa hyp (Pa hyp 100). Cut-offs from continuous
  // thermodilution (de Vos et al., JACC Cardiovasc Interv 2023;16(4):470–481): < 2.1 rules in, > 2.7 rules out, between
  // is borderline (the bolus cut-off is not settled).
  it.each([
    { restPa: 83.6, mrr: 2.09, flag: 'abnormal' },
    { restPa: 84, mrr: 2.1, flag: 'borderline' },
    { restPa: 107.6, mrr: 2.69, flag: 'borderline' },
    { restPa: 108, mrr: 2.7, flag: 'borderline' },
    { restPa: 108.4, mrr: 2.71, flag: 'normal' },
  ])(`MRR: (2.0 / 0.80) × Pa $restPa / 100 = $mrr → $flag — ${SRC.mrr}`, ({ restPa, mrr, flag }) => {
    const v = one({
      rest: { pa: restPa, pd: 100, tmn: three(1.0) },
      hyperemia: { pa: 100, pd: 80, tmn: three(0.5) },
    });
    expect(v.mrr).toBeCloseTo(mrr, 10);
    expect(v.mrrFlag).toBe(flag);
    // The value says which method it comes from: its cut-offs were set with continuous thermodilution.
    expect(v.mrrMethod).toBe('bolus-thermodilution');
  });

  it(`MRR uses the entered FFR only through the pressures; none without hyperaemic pressures — ${SRC.mrr}`, () => {
    const v = one({ ffr: 0.8, rest: { pa: 100, pd: 95, tmn: three(0.9) } });
    expect(v.mrr).toBeUndefined();
    expect(v.rrr).toBeUndefined();
  });
});

describe('thresholds', () => {
  it(`every default carries a source, marked [memory]/[practice] where it is recalled or common practice — ${SRC.practice}`, () => {
    for (const k of Object.keys(defaultThresholds) as Array<keyof typeof defaultThresholds>) {
      expect(thresholdSources[k], k).toMatch(/\S/);
    }
    expect(thresholdSources.rrr).toContain('[memory');
    expect(thresholdSources.driftLow).toContain('[memory]');
    expect(thresholdSources.injectionSpread).toContain('[memory]');
    expect(thresholdSources.endothelialDysfunctionPct).toContain('[memory]');
    expect(thresholdSources.pdPaMaxPlausible).toContain('[practice]');
    expect(thresholdSources.ffr).toContain('ESC 2024');
  });

  it.each([
    { name: 'ffr', value: 0.75, input: { hyperemia: { pa: 100, pd: 78 } }, key: 'ffrFlag', expected: 'normal' },
    { name: 'imr', value: 40, input: { hyperemia: { pa: 100, pd: 90, tmn: three(0.4) } }, key: 'imrFlag', expected: 'normal' },
    { name: 'restingPdPa', value: 0.92, input: { rest: { pa: 100, pd: 92 } }, key: 'restingPdPaFlag', expected: 'abnormal' },
    { name: 'nhprDiastolic', value: 0.9, input: { nhpr: { kind: 'diastolic', value: 0.9 } }, key: 'nhprFlag', expected: 'abnormal' },
    {
      name: 'cfr',
      value: 2.5,
      input: { rest: { pa: 100, pd: 95, tmn: three(1.2) }, hyperemia: { pa: 100, pd: 90, tmn: three(0.5) } },
      key: 'cfrFlag',
      expected: 'abnormal',
    },
  ] as const)(`per-call override $name = $value — ${SRC.practice} (the lab's settings)`, ({ name, value, input, key, expected }) => {
    const withOverride = one(input as Partial<VesselIn>, { thresholds: { [name]: value } });
    expect(withOverride[key]).toBe(expected);
    const withDefaults = one(input as Partial<VesselIn>);
    expect(withDefaults[key]).not.toBe(expected);
  });

  it(`an overridden cut-off is cited as the lab setting — ${SRC.practice}`, () => {
    const r = analyzeStudy({
      vessels: [{ id: 'v', vessel: 'RCA', hyperemia: { pa: 100, pd: 74 } }],
      thresholds: { ffr: 0.75 },
    });
    expect(r.reasons[0]).toBe(
      'RCA: FFR 0.74 is at or below the 0.75 cut-off (lab setting) — a haemodynamically significant stenosis.',
    );
  });

  it(`flags are judged at the displayed precision, so the flag agrees with the printed value — ${SRC.precision}`, () => {
    // CFR 0.998 / 0.5 = 1.996, shown 2.00: not below the 2.00 cut-off.
    const cfr = analyzeStudy({
      vessels: [{ id: 'v', vessel: 'LAD', rest: { pa: 100, pd: 95, tmn: three(0.998) }, hyperemia: { pa: 100, pd: 90, tmn: three(0.5) } }],
    }).vessels[0];
    expect(cfr.cfr).toBeCloseTo(1.996, 10);
    expect(cfr.cfrFlag).toBe('normal');
    // CFR 0.9975 / 0.5 = 1.995 rounds half away to 2.00 as well; 0.997 / 0.5 = 1.994 → 1.99, abnormal.
    const cfr2 = one({ rest: { pa: 100, pd: 95, tmn: three(0.9975) }, hyperemia: { pa: 100, pd: 90, tmn: three(0.5) } });
    expect(cfr2.cfrFlag).toBe('normal');
    const cfr3 = one({ rest: { pa: 100, pd: 95, tmn: three(0.997) }, hyperemia: { pa: 100, pd: 90, tmn: three(0.5) } });
    expect(cfr3.cfrFlag).toBe('abnormal');
    // FFR 79.6 / 100 = 0.796 is shown 0.80 and judged 0.80: abnormal, and the sentence prints 0.80.
    const r2 = analyzeStudy({ vessels: [{ id: 'v', vessel: 'LAD', hyperemia: { pa: 100, pd: 79.6 } }] });
    expect(r2.vessels[0].ffr).toBeCloseTo(0.796, 10);
    expect(r2.reasons[0]).toMatch(/^LAD: FFR 0\.80 is at or below the 0\.80 cut-off/);
    // FFR 80.5 / 100 = 0.805 is shown 0.81: normal.
    expect(one({ hyperemia: { pa: 100, pd: 80.5 } }).ffrFlag).toBe('normal');
    expect(one({ hyperemia: { pa: 100, pd: 80.4 } }).ffrFlag).toBe('abnormal');
  });
});
