import { describe, expect, it } from 'vitest';
import { ZodError } from 'zod';
import { analyzeStudy, physiologyInputSchema, type PhysiologyInput } from '../../../shared/physiology';

const SRC = {
  pressure: 'common practice: mean pressures are positive and never above 300 mmHg',
  transit: 'common practice: thermodilution transit times are positive and never above 10 s',
  ratio: 'common practice: a pressure ratio is positive; above 1.5 is impossible',
  wedge: 'Layland et al., Heart 2012 (wedge pressure measured during balloon occlusion, ≥ 0 mmHg)',
  contract: 'the analyzeStudy contract: inputs validated by its exported zod schema (common practice)',
  ach: 'ESC 2024 protocol figure (doses in µg); COVADIS (constriction in %)',
  practice: 'common practice',
};

const base = (): PhysiologyInput => ({
  vessels: [
    {
      id: 'lad',
      vessel: 'LAD',
      rest: { pa: 100, pd: 95, tmn: [0.9, 0.9, 0.9] },
      hyperemia: { pa: 95, pd: 80, tmn: [0.3, 0.3, 0.3] },
      ffr: 0.84,
      nhpr: { kind: 'diastolic', value: 0.93 },
      wedgePressure: 20,
      driftPdPa: 1.0,
    },
  ],
  vasoreactivity: { doses: [{ vessel: 'LAD', micrograms: 100, constrictionPct: 20, symptoms: false, ischemicEcg: false }] },
});

type Mutable = Record<string, any>;
const withChange = (fn: (x: Mutable) => void): unknown => {
  const x = base() as Mutable;
  fn(x);
  return x;
};

function caught(input: unknown): ZodError {
  try {
    analyzeStudy(input as PhysiologyInput);
  } catch (e) {
    expect(e).toBeInstanceOf(ZodError);
    return e as ZodError;
  }
  throw new Error('expected analyzeStudy to throw');
}

const v0 = ['vessels', 0];
const d0 = ['vasoreactivity', 'doses', 0];

describe('valid input is accepted', () => {
  it(`the full example analyses without error — ${SRC.contract}`, () => {
    expect(() => analyzeStudy(base())).not.toThrow();
    expect(physiologyInputSchema.safeParse(base()).success).toBe(true);
  });

  it.each([
    { name: 'pressure exactly 300 mmHg', fn: (x: Mutable) => (x.vessels[0].rest.pa = 300), source: SRC.pressure },
    { name: 'transit time exactly 10 s', fn: (x: Mutable) => (x.vessels[0].rest.tmn = [10, 10, 10]), source: SRC.transit },
    { name: 'FFR 1.5', fn: (x: Mutable) => (x.vessels[0].ffr = 1.5), source: SRC.ratio },
    { name: 'constriction 0% and 100%', fn: (x: Mutable) => (x.vasoreactivity.doses.push({ ...x.vasoreactivity.doses[0], constrictionPct: 100 }), (x.vasoreactivity.doses[0].constrictionPct = 0)), source: SRC.ach },
    { name: 'acetylcholine 1000 µg (with a warning)', fn: (x: Mutable) => (x.vasoreactivity.doses[0].micrograms = 1000), source: SRC.ach },
    { name: 'optional keys explicitly undefined', fn: (x: Mutable) => (x.vessels[0].ffr = undefined), source: SRC.contract },
    { name: 'no vessels', fn: (x: Mutable) => (x.vessels = []), source: SRC.contract },
  ])('$name — $source', ({ fn }) => {
    expect(() => analyzeStudy(withChange(fn) as PhysiologyInput)).not.toThrow();
  });
});

describe('rejections: a ZodError whose issue path names the field', () => {
  const cases: Array<{ name: string; fn: (x: Mutable) => void; path: Array<string | number>; unit?: string; source: string }> = [
    // Pressures
    ...(['pa', 'pd'] as const).flatMap((k) =>
      (['rest', 'hyperemia'] as const).flatMap((phase) =>
        ([
          ['0', 0],
          ['negative', -5],
          ['NaN', Number.NaN],
          ['Infinity', Number.POSITIVE_INFINITY],
          ['above 300 mmHg', 301],
          ['a string', '100'],
        ] as const).map(([what, value]) => ({
          name: `${phase}.${k} ${what}`,
          fn: (x: Mutable) => (x.vessels[0][phase][k] = value),
          path: [...v0, phase, k],
          unit: 'mmHg',
          source: SRC.pressure,
        })),
      ),
    ),
    { name: 'rest.pa missing', fn: (x) => delete x.vessels[0].rest.pa, path: [...v0, 'rest', 'pa'], source: SRC.contract },
    // Wedge
    { name: 'wedge negative', fn: (x) => (x.vessels[0].wedgePressure = -1), path: [...v0, 'wedgePressure'], unit: 'mmHg', source: SRC.wedge },
    { name: 'wedge zero', fn: (x) => (x.vessels[0].wedgePressure = 0), path: [...v0, 'wedgePressure'], unit: 'mmHg', source: SRC.wedge },
    { name: 'wedge above 300', fn: (x) => (x.vessels[0].wedgePressure = 301), path: [...v0, 'wedgePressure'], unit: 'mmHg', source: SRC.pressure },
    { name: 'wedge NaN', fn: (x) => (x.vessels[0].wedgePressure = Number.NaN), path: [...v0, 'wedgePressure'], unit: 'mmHg', source: SRC.pressure },
    // Transit times
    ...([
      ['0', 0],
      ['negative', -0.1],
      ['NaN', Number.NaN],
      ['-Infinity', Number.NEGATIVE_INFINITY],
      ['above 10 s', 10.5],
      ['null', null],
    ] as const).map(([what, value]) => ({
      name: `hyperemia.tmn[1] ${what}`,
      fn: (x: Mutable) => (x.vessels[0].hyperemia.tmn[1] = value),
      path: [...v0, 'hyperemia', 'tmn', 1],
      unit: 's',
      source: SRC.transit,
    })),
    { name: 'rest.tmn not a list', fn: (x) => (x.vessels[0].rest.tmn = 0.9), path: [...v0, 'rest', 'tmn'], unit: 'seconds', source: SRC.transit },
    // Ratios
    ...(
      [
        ['ffr', (x: Mutable, v: number) => (x.vessels[0].ffr = v), [...v0, 'ffr']],
        ['nhpr.value', (x: Mutable, v: number) => (x.vessels[0].nhpr.value = v), [...v0, 'nhpr', 'value']],
        ['driftPdPa', (x: Mutable, v: number) => (x.vessels[0].driftPdPa = v), [...v0, 'driftPdPa']],
      ] as const
    ).flatMap(([field, set, path]) =>
      ([
        ['0', 0],
        ['negative', -0.8],
        ['NaN', Number.NaN],
        ['above 1.5', 1.6],
      ] as const).map(([what, value]) => ({
        name: `${field} ${what}`,
        fn: (x: Mutable) => set(x, value),
        path: [...path],
        unit: 'ratio',
        source: SRC.ratio,
      })),
    ),
    { name: 'nhpr kind unknown', fn: (x) => (x.vessels[0].nhpr.kind = 'hybrid'), path: [...v0, 'nhpr', 'kind'], source: SRC.contract },
    // Identity
    { name: 'unknown vessel code', fn: (x) => (x.vessels[0].vessel = 'LIMA'), path: [...v0, 'vessel'], source: SRC.contract },
    { name: 'lower-case vessel code', fn: (x) => (x.vessels[0].vessel = 'lad'), path: [...v0, 'vessel'], source: SRC.contract },
    { name: 'empty id', fn: (x) => (x.vessels[0].id = ''), path: [...v0, 'id'], source: SRC.contract },
    { name: 'numeric id', fn: (x) => (x.vessels[0].id = 7), path: [...v0, 'id'], source: SRC.contract },
    {
      name: 'duplicate vessel id',
      fn: (x) => x.vessels.push({ id: 'lad', vessel: 'LCX', ffr: 0.9 }),
      path: ['vessels', 1, 'id'],
      source: SRC.contract,
    },
    { name: 'vessels missing', fn: (x) => delete x.vessels, path: ['vessels'], source: SRC.contract },
    { name: 'vessels not a list', fn: (x) => (x.vessels = {}), path: ['vessels'], source: SRC.contract },
    // Unknown keys (strict objects): the path names the object, `keys` the field.
    { name: 'unknown key on a vessel', fn: (x) => (x.vessels[0].heartRate = 70), path: [...v0], source: SRC.contract },
    { name: 'unknown key on rest', fn: (x) => (x.vessels[0].rest.hr = 70), path: [...v0, 'rest'], source: SRC.contract },
    { name: 'unknown top-level key', fn: (x) => (x.patient = 'x'), path: [], source: SRC.contract },
    // Acetylcholine
    { name: 'dose 0 µg', fn: (x) => (x.vasoreactivity.doses[0].micrograms = 0), path: [...d0, 'micrograms'], unit: 'µg', source: SRC.ach },
    { name: 'dose above 1000 µg', fn: (x) => (x.vasoreactivity.doses[0].micrograms = 1001), path: [...d0, 'micrograms'], unit: 'µg', source: SRC.ach },
    { name: 'dose NaN', fn: (x) => (x.vasoreactivity.doses[0].micrograms = Number.NaN), path: [...d0, 'micrograms'], unit: 'µg', source: SRC.ach },
    { name: 'constriction −1%', fn: (x) => (x.vasoreactivity.doses[0].constrictionPct = -1), path: [...d0, 'constrictionPct'], unit: '%', source: SRC.ach },
    { name: 'constriction 101%', fn: (x) => (x.vasoreactivity.doses[0].constrictionPct = 101), path: [...d0, 'constrictionPct'], unit: '%', source: SRC.ach },
    { name: 'symptoms not boolean', fn: (x) => (x.vasoreactivity.doses[0].symptoms = 'yes'), path: [...d0, 'symptoms'], source: SRC.ach },
    { name: 'ischemicEcg not boolean', fn: (x) => (x.vasoreactivity.doses[0].ischemicEcg = 1), path: [...d0, 'ischemicEcg'], source: SRC.ach },
    { name: 'dose vessel unknown', fn: (x) => (x.vasoreactivity.doses[0].vessel = 'AORTA'), path: [...d0, 'vessel'], source: SRC.contract },
    { name: 'unknown key on a dose', fn: (x) => (x.vasoreactivity.doses[0].agent = 'ergonovine'), path: [...d0], source: SRC.contract },
    { name: 'doses missing', fn: (x) => (x.vasoreactivity = {}), path: ['vasoreactivity', 'doses'], source: SRC.contract },
    // Thresholds
    { name: 'threshold negative', fn: (x) => (x.thresholds = { ffr: -0.8 }), path: ['thresholds', 'ffr'], source: SRC.practice },
    { name: 'threshold zero', fn: (x) => (x.thresholds = { imr: 0 }), path: ['thresholds', 'imr'], source: SRC.practice },
    { name: 'threshold NaN', fn: (x) => (x.thresholds = { cfr: Number.NaN }), path: ['thresholds', 'cfr'], source: SRC.practice },
    { name: 'threshold Infinity', fn: (x) => (x.thresholds = { cfr: Number.POSITIVE_INFINITY }), path: ['thresholds', 'cfr'], source: SRC.practice },
    { name: 'threshold as a string', fn: (x) => (x.thresholds = { ffr: '0.8' }), path: ['thresholds', 'ffr'], source: SRC.practice },
    { name: 'minInjections not whole', fn: (x) => (x.thresholds = { minInjections: 2.5 }), path: ['thresholds', 'minInjections'], source: SRC.practice },
    { name: 'percentage threshold above 100', fn: (x) => (x.thresholds = { spasmConstrictionPct: 120 }), path: ['thresholds', 'spasmConstrictionPct'], source: SRC.practice },
    { name: 'unknown threshold', fn: (x) => (x.thresholds = { restingRatio: 0.89 }), path: ['thresholds'], source: SRC.practice },
  ];

  it.each(cases)('$name — $source', ({ fn, path, unit }) => {
    const err = caught(withChange(fn));
    const issue = err.issues.find((i) => JSON.stringify(i.path) === JSON.stringify(path));
    expect(issue, `no issue at ${JSON.stringify(path)}: ${JSON.stringify(err.issues)}`).toBeDefined();
    expect(issue!.message).toMatch(/^[A-Z].*\.$/); // a plain sentence
    if (unit) expect(issue!.message).toContain(unit);
  });

  it(`unknown keys are listed in the issue — ${SRC.contract}`, () => {
    const err = caught(withChange((x) => (x.vessels[0].heartRate = 70)));
    const issue = err.issues.find((i) => i.code === 'unrecognized_keys');
    expect(issue && 'keys' in issue ? issue.keys : []).toEqual(['heartRate']);
    expect(issue?.message).toContain('heartRate');
  });

  it(`messages name the field in plain English — ${SRC.pressure}`, () => {
    const err = caught(withChange((x) => (x.vessels[0].hyperemia.pd = 350)));
    expect(err.issues[0].message).toBe(
      'Hyperaemic distal coronary pressure (Pd) must be at most 300 mmHg; higher values are not possible.',
    );
  });
});
