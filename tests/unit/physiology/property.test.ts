import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { analyzeStudy, physiologyInputSchema, vesselCodes, type PhysiologyInput } from '../../../shared/physiology';
import { isCertainlyValid } from '../../../shared/physiology/fastpath';
import { analyzeValidated } from '../../../shared/physiology/study';

// Property-based checks. Sources: the published formulas and cut-offs (EAPCI 2020; ESC 2024) (monotone by
// construction: FFR ≤ cut-off, IMR ≥ cut-off); the input limits are common practice.

type VesselIn = PhysiologyInput['vessels'][number];

const pressure = fc.oneof(fc.integer({ min: 1, max: 300 }), fc.double({ min: 0.001, max: 300, noNaN: true }));
const transit = fc.oneof(
  fc.double({ min: 0.05, max: 2, noNaN: true }),
  fc.double({ min: 0.001, max: 10, noNaN: true }),
);
const ratio = fc.double({ min: 0.001, max: 1.5, noNaN: true });
const pressureSet = fc.record(
  { pa: pressure, pd: pressure, tmn: fc.array(transit, { maxLength: 5 }) },
  { requiredKeys: ['pa', 'pd'] },
);
const vesselArb = fc.record(
  {
    vessel: fc.constantFrom(...vesselCodes),
    rest: pressureSet,
    hyperemia: pressureSet,
    ffr: ratio,
    nhpr: fc.record({ kind: fc.constantFrom('whole-cycle', 'diastolic', 'full-cycle-minimum'), value: ratio }),
    wedgePressure: fc.double({ min: 0.001, max: 300, noNaN: true }),
    driftPdPa: ratio,
  },
  { requiredKeys: ['vessel'] },
);
const doseArb = fc.record({
  vessel: fc.constantFrom(...vesselCodes),
  micrograms: fc.double({ min: 0.001, max: 1000, noNaN: true }),
  constrictionPct: fc.double({ min: 0, max: 100, noNaN: true }),
  symptoms: fc.boolean(),
  ischemicEcg: fc.boolean(),
});
const positive = fc.double({ min: 0.001, max: 300, noNaN: true });
const thresholdsArb = fc.record(
  {
    ffr: ratio,
    restingPdPa: ratio,
    nhprWholeCycle: ratio,
    nhprDiastolic: ratio,
    nhprFullCycleMinimum: ratio,
    cfr: fc.double({ min: 0.1, max: 5, noNaN: true }),
    cfrBorderline: fc.double({ min: 0.1, max: 5, noNaN: true }),
    imr: positive,
    rrr: positive,
    mrr: positive,
    ffrGreyZoneLow: ratio,
    driftLow: ratio,
    driftHigh: ratio,
    injectionSpread: fc.double({ min: 0.001, max: 2, noNaN: true }),
    minInjections: fc.integer({ min: 1, max: 6 }),
    spasmConstrictionPct: fc.double({ min: 0.001, max: 100, noNaN: true }),
    endothelialDysfunctionPct: fc.double({ min: 0.001, max: 100, noNaN: true }),
    achMaxMicrograms: positive,
    pdPaMaxPlausible: ratio,
  },
  { requiredKeys: [] },
);
const inputArb: fc.Arbitrary<PhysiologyInput> = fc
  .record(
    {
      vessels: fc.array(vesselArb, { maxLength: 6 }),
      vasoreactivity: fc.record({ doses: fc.array(doseArb, { maxLength: 4 }) }),
      thresholds: thresholdsArb,
    },
    { requiredKeys: ['vessels'] },
  )
  .map((x) => ({ ...x, vessels: x.vessels.map((v, i) => ({ id: `v${i}`, ...v }) as VesselIn) }));

function numbersAndStrings(x: unknown, nums: number[], strs: string[]): void {
  if (typeof x === 'number') nums.push(x);
  else if (typeof x === 'string') strs.push(x);
  else if (Array.isArray(x)) for (const y of x) numbersAndStrings(y, nums, strs);
  else if (x !== null && typeof x === 'object') for (const y of Object.values(x)) numbersAndStrings(y, nums, strs);
}

describe('random valid inputs', () => {
  it('never throw and never return NaN or Infinity (fields or text) — common practice', () => {
    fc.assert(
      fc.property(inputArb, (input) => {
        const r = analyzeStudy(input);
        const nums: number[] = [];
        const strs: string[] = [];
        numbersAndStrings(r, nums, strs);
        for (const n of nums) expect(Number.isFinite(n)).toBe(true);
        for (const s of strs) expect(s).not.toMatch(/NaN|Infinity|undefined/);
        expect(r.vessels).toHaveLength(input.vessels.length);
        expect(r.reasons.length).toBeGreaterThan(0);
      }),
      { numRuns: 1500 },
    );
  });
});

describe('monotone flags', () => {
  const withHyp = fc.record({
    v: vesselArb,
    hyp: pressureSet,
    k: fc.double({ min: 0, max: 1, noNaN: true }),
    thresholds: thresholdsArb,
  });

  it('lowering hyperaemic Pd never flips ffrFlag abnormal → normal — ESC 2024 (FFR ≤ 0.80)', () => {
    fc.assert(
      fc.property(withHyp, ({ v, hyp, k, thresholds }) => {
        const a: VesselIn = { ...v, id: 'a', hyperemia: hyp };
        const b: VesselIn = { ...a, hyperemia: { ...hyp, pd: Math.max(0.001, hyp.pd * k) } };
        const fa = analyzeStudy({ vessels: [a], thresholds }).vessels[0].ffrFlag;
        const fb = analyzeStudy({ vessels: [b], thresholds }).vessels[0].ffrFlag;
        if (fa === 'abnormal') expect(fb).toBe('abnormal');
      }),
      { numRuns: 1000 },
    );
  });

  it('lowering an entered FFR never flips ffrFlag abnormal → normal — ESC 2024 (FFR ≤ 0.80)', () => {
    fc.assert(
      fc.property(ratio, fc.double({ min: 0, max: 1, noNaN: true }), thresholdsArb, (ffr, k, thresholds) => {
        const flag = (x: number) => analyzeStudy({ vessels: [{ id: 'a', vessel: 'LAD', ffr: x }], thresholds }).vessels[0].ffrFlag;
        if (flag(ffr) === 'abnormal') expect(flag(Math.max(0.001, ffr * k))).toBe('abnormal');
      }),
    );
  });

  it('raising hyperaemic Tmn never flips imrFlag abnormal → normal (every IMR method) — ESC 2024; EAPCI 2020 (IMR ≥ 25)', () => {
    fc.assert(
      fc.property(
        withHyp,
        fc.array(transit, { minLength: 1, maxLength: 5 }),
        fc.double({ min: 1, max: 50, noNaN: true }),
        ({ v, hyp, thresholds }, tmn, k) => {
          const a: VesselIn = { ...v, id: 'a', hyperemia: { ...hyp, tmn } };
          const b: VesselIn = { ...a, hyperemia: { ...hyp, tmn: tmn.map((x) => Math.min(10, x * k)) } };
          const ra = analyzeStudy({ vessels: [a], thresholds }).vessels[0];
          const rb = analyzeStudy({ vessels: [b], thresholds }).vessels[0];
          expect(rb.imrMethod).toBe(ra.imrMethod);
          // Unless the longer times bring CFR below 1: then the transit times are taken for an error and IMR is left unjudged.
          const doubtful = rb.warnings.some((w) => w.code === 'cfr-below-one');
          if (ra.imrFlag === 'abnormal') expect(rb.imrFlag).toBe(doubtful ? undefined : 'abnormal');
        },
      ),
      { numRuns: 1000 },
    );
  });

  it('raising hyperaemic Pd (no wedge, default FFR cut-off) never flips imrFlag abnormal → normal — ESC 2024; Yong correction', () => {
    // With a wedge pressure, raising Pd can make an invalid wedge valid and switch method, so it is excluded.
    fc.assert(
      fc.property(
        vesselArb,
        pressureSet,
        fc.array(transit, { minLength: 1, maxLength: 5 }),
        fc.double({ min: 1, max: 5, noNaN: true }),
        (v, hyp, tmn, k) => {
          const { wedgePressure: _w, ...rest } = v;
          const a: VesselIn = { ...rest, id: 'a', hyperemia: { ...hyp, tmn } };
          const b: VesselIn = { ...a, hyperemia: { ...hyp, tmn, pd: Math.min(300, hyp.pd * k) } };
          const fa = analyzeStudy({ vessels: [a] }).vessels[0].imrFlag;
          const fb = analyzeStudy({ vessels: [b] }).vessels[0].imrFlag;
          if (fa === 'abnormal') expect(fb).toBe('abnormal');
        },
      ),
      { numRuns: 1000 },
    );
  });
});

// The pre-check that lets well-formed input skip the zod parse must never accept what the schema rejects.
describe('validation fast path agrees with the schema', () => {
  const junk = fc.constantFrom<unknown>(
    0, -1, -0, 0.0001, Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY, 301, 11, 1.6, 101, 1001, 2.5,
    '1', '', null, undefined, {}, [], [1], true, 'LIMA', 'LAD', 'diastolic', 'v0', 1e-300,
  );
  type Path = Array<string | number>;
  function paths(x: unknown, at: Path = [], out: Path[] = []): Path[] {
    out.push(at);
    if (x !== null && typeof x === 'object') {
      for (const [k, v] of Object.entries(x)) paths(v, [...at, Array.isArray(x) ? Number(k) : k], out);
    }
    return out;
  }
  function mutate(input: PhysiologyInput, pick: number, how: 'set' | 'delete' | 'add-key' | 'dup-id', value: unknown): unknown {
    const x = structuredClone(input) as unknown as Record<string, unknown>;
    if (how === 'dup-id') {
      const vs = x.vessels as Array<Record<string, unknown>>;
      if (vs.length >= 2) vs[vs.length - 1].id = vs[0].id;
      return x;
    }
    const all = paths(x).filter((p) => p.length > 0);
    const p = all[pick % all.length];
    let parent: any = x;
    for (const seg of p.slice(0, -1)) parent = parent[seg];
    const last = p[p.length - 1];
    if (how === 'set') parent[last] = value;
    else if (how === 'delete') delete parent[last];
    else if (parent[last] !== null && typeof parent[last] === 'object') parent[last].extra = value;
    return x;
  }

  it('accepts only what the schema accepts — common practice (one authority for validation)', () => {
    fc.assert(
      fc.property(
        inputArb,
        fc.nat(),
        fc.constantFrom('set', 'delete', 'add-key', 'dup-id'),
        junk,
        (input, pick, how, value) => {
          const x = mutate(input, pick, how as 'set', value);
          if (isCertainlyValid(x)) expect(physiologyInputSchema.safeParse(x).success).toBe(true);
        },
      ),
      { numRuns: 4000 },
    );
  });

  it('takes the fast path for generated valid input and gives the same result as the schema path — common practice', () => {
    fc.assert(
      fc.property(inputArb, (input) => {
        expect(isCertainlyValid(input)).toBe(true);
        expect(analyzeStudy(input)).toEqual(analyzeValidated(physiologyInputSchema.parse(input)));
      }),
      { numRuns: 500 },
    );
  });

  it('non-plain objects and odd shapes are left to the schema — common practice', () => {
    class Vessel {
      id = 'a';
      vessel = 'LAD' as const;
    }
    expect(isCertainlyValid({ vessels: [new Vessel()] })).toBe(false);
    expect(isCertainlyValid(null)).toBe(false);
    expect(isCertainlyValid([])).toBe(false);
    expect(isCertainlyValid({ vessels: [{ id: 'a', vessel: 'LAD', ffr: undefined }] })).toBe(false);
    expect(() => analyzeStudy({ vessels: [new Vessel()] })).not.toThrow();
  });
});
