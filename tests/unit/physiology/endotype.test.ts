import { describe, expect, it } from 'vitest';
import { analyzeStudy, type PhysiologyInput } from '../../../shared/physiology';

type VesselIn = PhysiologyInput['vessels'][number];
type Dose = NonNullable<PhysiologyInput['vasoreactivity']>['doses'][number];

const SRC = {
  endotypes: 'EAPCI 2020; CorMicA (Ford et al. 2019); ILIAS (Boerhout et al. 2022) — endotypes',
  covadis: 'COVADIS (Beltrame et al., EHJ 2017; Ong et al., IJC 2018) — microvascular angina and spasm',
  ffr: 'ESC 2024; EAPCI 2020; FAME (FFR ≤ 0.80)',
  nhpr: 'DEFINE-FLAIR 2017; EAPCI 2020 (NHPR ≤ 0.89)',
  imr: 'ESC 2024; EAPCI 2020 (IMR ≥ 25)',
  cfr: 'EAPCI 2020 (CFR < 2.0); ESC 2024 (< 2.5)',
  practice: 'common practice',
};

const three = (x: number) => [x, x, x];

// Building blocks (values hand-computed from the published formulas: CFR = Tmn rest / Tmn hyp, IMR = Pd × Tmn — EAPCI 2020).
/** FFR 0.90, CFR 3.0, IMR 27 × 0.3 … chosen per case below. */
function vessel(id: string, opts: { ffrPd?: number; cfr?: number; imrTmn?: number; vessel?: VesselIn['vessel'] } = {}): VesselIn {
  const hypTmn = opts.imrTmn ?? 0.2; // IMR = 90 × Tmn (FFR 0.90 → Pd × Tmn): 0.2 → 18 (normal), 0.4 → 36 (abnormal)
  const cfr = opts.cfr ?? 3.0;
  return {
    id,
    vessel: opts.vessel ?? 'LAD',
    rest: { pa: 100, pd: 97, tmn: three(hypTmn * cfr) },
    hyperemia: { pa: 100, pd: opts.ffrPd ?? 90, tmn: three(hypTmn) },
  };
}
const normalVessel = (id = 'lad', code: VesselIn['vessel'] = 'LAD') => vessel(id, { vessel: code });
const negativeAch: Dose[] = [{ vessel: 'LAD', micrograms: 100, constrictionPct: 10, symptoms: false, ischemicEcg: false }];
const epicardialSpasm: Dose[] = [{ vessel: 'LAD', micrograms: 100, constrictionPct: 95, symptoms: true, ischemicEcg: true }];
const microSpasm: Dose[] = [{ vessel: 'LAD', micrograms: 100, constrictionPct: 40, symptoms: true, ischemicEcg: true }];
const endothelial: Dose[] = [{ vessel: 'LAD', micrograms: 100, constrictionPct: 50, symptoms: false, ischemicEcg: false }];

function study(vessels: VesselIn[], doses?: Dose[], thresholds?: PhysiologyInput['thresholds']) {
  return analyzeStudy({ vessels, ...(doses ? { vasoreactivity: { doses } } : {}), ...(thresholds ? { thresholds } : {}) });
}

describe('endotypes', () => {
  it.each([
    {
      name: 'obstructive (abnormal FFR wins over CMD and spasm)',
      vessels: [vessel('lad', { ffrPd: 75, cfr: 1.5, imrTmn: 0.4 })],
      doses: epicardialSpasm,
      endotype: 'obstructive',
      findings: { obstructive: true, microvascular: null, vasospasm: 'epicardial' },
      source: `${SRC.endotypes}; ${SRC.ffr}`,
    },
    {
      name: 'obstructive from a resting ratio when no FFR',
      vessels: [{ id: 'rca', vessel: 'RCA', nhpr: { kind: 'diastolic', value: 0.85 } } as VesselIn],
      doses: undefined,
      endotype: 'obstructive',
      findings: { obstructive: true, microvascular: null, vasospasm: null },
      source: `${SRC.endotypes}; ${SRC.nhpr}`,
    },
    {
      name: 'obstructive from computed resting Pd/Pa when no FFR',
      vessels: [{ id: 'rca', vessel: 'RCA', rest: { pa: 100, pd: 88 } } as VesselIn],
      doses: undefined,
      endotype: 'obstructive',
      findings: { obstructive: true, microvascular: null, vasospasm: null },
      source: `${SRC.endotypes}; CONTRAST (whole-cycle Pd/Pa ≤ 0.91)`,
    },
    {
      name: 'microvascular angina, structural (IMR ≥ 25)',
      vessels: [vessel('lad', { imrTmn: 0.4, cfr: 1.5 })],
      doses: negativeAch,
      endotype: 'microvascular-angina',
      findings: { obstructive: false, microvascular: 'structural', vasospasm: null },
      source: `${SRC.endotypes}; ${SRC.imr}`,
    },
    {
      name: 'microvascular angina, structural with normal CFR',
      vessels: [vessel('lad', { imrTmn: 0.4, cfr: 3.0 })],
      doses: negativeAch,
      endotype: 'microvascular-angina',
      findings: { obstructive: false, microvascular: 'structural', vasospasm: null },
      source: `${SRC.endotypes}; ${SRC.imr}`,
    },
    {
      name: 'microvascular angina, functional (low CFR, normal IMR)',
      vessels: [vessel('lad', { cfr: 1.5 })],
      doses: negativeAch,
      endotype: 'microvascular-angina',
      findings: { obstructive: false, microvascular: 'functional', vasospasm: null },
      source: `${SRC.endotypes}; ${SRC.cfr}`,
    },
    {
      name: 'microvascular angina from microvascular spasm alone',
      vessels: [normalVessel()],
      doses: microSpasm,
      endotype: 'microvascular-angina',
      findings: { obstructive: false, microvascular: null, vasospasm: 'microvascular' },
      source: SRC.covadis,
    },
    {
      name: 'microvascular angina: CMD plus microvascular spasm',
      vessels: [vessel('lad', { cfr: 1.5 })],
      doses: microSpasm,
      endotype: 'microvascular-angina',
      findings: { obstructive: false, microvascular: 'functional', vasospasm: 'microvascular' },
      source: SRC.covadis,
    },
    {
      name: 'mixed (CMD + epicardial spasm)',
      vessels: [vessel('lad', { cfr: 1.5 })],
      doses: epicardialSpasm,
      endotype: 'mixed',
      findings: { obstructive: false, microvascular: 'functional', vasospasm: 'epicardial' },
      source: SRC.endotypes,
    },
    {
      name: 'vasospastic angina',
      vessels: [normalVessel()],
      doses: epicardialSpasm,
      endotype: 'vasospastic-angina',
      findings: { obstructive: false, microvascular: null, vasospasm: 'epicardial' },
      source: `${SRC.endotypes}; ${SRC.covadis}`,
    },
    {
      name: 'vasospastic angina even with no physiology measured',
      vessels: [],
      doses: epicardialSpasm,
      endotype: 'vasospastic-angina',
      findings: { obstructive: false, microvascular: null, vasospasm: 'epicardial' },
      source: SRC.endotypes,
    },
    {
      name: 'no abnormality (everything assessed and normal)',
      vessels: [normalVessel()],
      doses: negativeAch,
      endotype: 'no-abnormality',
      findings: { obstructive: false, microvascular: null, vasospasm: null },
      source: SRC.endotypes,
    },
    {
      name: 'no abnormality with endothelial dysfunction only',
      vessels: [normalVessel()],
      doses: endothelial,
      endotype: 'no-abnormality',
      findings: { obstructive: false, microvascular: null, vasospasm: null },
      source: `${SRC.endotypes}; ${SRC.covadis} (endothelial dysfunction is not spasm)`,
    },
    {
      name: 'no abnormality with a borderline CFR only',
      vessels: [vessel('lad', { cfr: 2.2 })],
      doses: negativeAch,
      endotype: 'no-abnormality',
      findings: { obstructive: false, microvascular: null, vasospasm: null },
      source: `${SRC.endotypes}; ${SRC.cfr} (borderline alone is not CMD)`,
    },
    {
      name: 'inconclusive: acetylcholine not tested',
      vessels: [normalVessel()],
      doses: undefined,
      endotype: 'inconclusive',
      findings: { obstructive: false, microvascular: null, vasospasm: null },
      source: SRC.endotypes,
    },
    {
      name: 'inconclusive: no microvascular index',
      vessels: [{ id: 'lad', vessel: 'LAD', hyperemia: { pa: 100, pd: 90 } } as VesselIn],
      doses: negativeAch,
      endotype: 'inconclusive',
      findings: { obstructive: false, microvascular: null, vasospasm: null },
      source: SRC.endotypes,
    },
    {
      name: 'inconclusive: nothing measured',
      vessels: [],
      doses: undefined,
      endotype: 'inconclusive',
      findings: { obstructive: false, microvascular: null, vasospasm: null },
      source: SRC.endotypes,
    },
  ] as const)('$name — $source', ({ vessels, doses, endotype, findings }) => {
    const r = study([...vessels] as VesselIn[], doses ? [...doses] : undefined);
    expect(r.endotype).toBe(endotype);
    expect(r.findings).toEqual(findings);
    expect(r.reasons.at(-1)).toMatch(/^Endotype: /);
  });
});

describe('findings rules', () => {
  it(`FFR decides over a disagreeing resting ratio — ${SRC.ffr}`, () => {
    const v = { ...normalVessel(), nhpr: { kind: 'diastolic' as const, value: 0.85 } };
    const r = study([v], negativeAch);
    expect(r.vessels[0].nhprFlag).toBe('abnormal');
    expect(r.findings.obstructive).toBe(false);
    expect(r.reasons.some((s) => s.includes('FFR decides'))).toBe(true);
  });

  it(`an entered resting ratio stands in for FFR before computed resting Pd/Pa — ${SRC.nhpr}`, () => {
    const r = study([{ id: 'x', vessel: 'LAD', rest: { pa: 100, pd: 90 }, nhpr: { kind: 'diastolic', value: 0.93 } }]);
    expect(r.vessels[0].restingPdPaFlag).toBe('abnormal');
    expect(r.findings.obstructive).toBe(false);
  });

  it(`CMD in an obstructed vessel does not count; another vessel's CMD does — ${SRC.covadis}`, () => {
    const obstructedWithCmd = vessel('lad', { ffrPd: 75, imrTmn: 0.6, cfr: 1.5 });
    const r1 = study([obstructedWithCmd, normalVessel('lcx', 'LCX')], negativeAch);
    expect(r1.findings).toEqual({ obstructive: true, microvascular: null, vasospasm: null });
    expect(r1.reasons.some((s) => s.includes('not used for the microvascular finding'))).toBe(true);
    const r2 = study([obstructedWithCmd, vessel('lcx', { vessel: 'LCX', cfr: 1.5 })], negativeAch);
    expect(r2.findings.microvascular).toBe('functional');
    expect(r2.endotype).toBe('obstructive');
  });

  it(`structural in any vessel outranks functional in another — ${SRC.endotypes}`, () => {
    const r = study([vessel('lad', { cfr: 1.5 }), vessel('lcx', { vessel: 'LCX', imrTmn: 0.4 })], negativeAch);
    expect(r.findings.microvascular).toBe('structural');
  });

  it(`borderline CFR (a lab's band up to 2.5) adds a reason sentence — ${SRC.cfr}`, () => {
    const r = study([vessel('lad', { cfr: 2.2 })], negativeAch, { cfrBorderline: 2.5 });
    expect(r.reasons.some((s) => s.startsWith('LAD: CFR 2.20 is in the borderline band 2.00–2.50'))).toBe(true);
    expect(r.reasons.at(-1)).toContain('borderline CFR');
  });

  it(`inconclusive names what was not assessed — ${SRC.endotypes}`, () => {
    const r = study([]);
    expect(r.reasons).toEqual([
      'Endotype: inconclusive — nothing abnormal was found, but an epicardial pressure index (FFR or a resting ratio), a microvascular index (CFR or IMR) and acetylcholine testing were not assessed.',
    ]);
    expect(study([normalVessel()]).reasons.at(-1)).toBe(
      'Endotype: inconclusive — nothing abnormal was found, but acetylcholine testing was not assessed.',
    );
  });

  it(`reason sentences: one per rule that fired, values rounded only in the text — ${SRC.practice}`, () => {
    const r = study([vessel('lad', { imrTmn: 0.4, cfr: 1.5 })], negativeAch);
    expect(r.reasons).toEqual([
      'LAD: IMR 36.0 (Pd × Tmn) is at or above the 25 cut-off (ESC 2024; EAPCI 2020) — raised microvascular resistance (structural microvascular dysfunction).',
      'LAD: CFR 1.50 is below the 2.00 cut-off (EAPCI 2020) — impaired coronary flow reserve.',
      'LAD: RRR 1.62 is below the 2.00 cut-off (from memory: CorMicA) — reduced resistive reserve.',
      'LAD: MRR 1.67 is below the 2.70 cut-off (ESC 2024) — reduced microvascular resistance reserve.',
      'Acetylcholine testing was negative: maximum constriction 10% (below 20%, from memory) and no dose reproduced symptoms together with ischaemic ECG changes (COVADIS; ESC 2024).',
      'Endotype: microvascular angina (structural microvascular dysfunction, IMR at or above 25) with no obstructive stenosis (COVADIS; EAPCI 2020).',
    ]);
    expect(r.vessels[0].imr).toBeCloseTo(36, 10);
    expect(r.vessels[0].rrr).toBeCloseTo((1.5 * 97) / 90, 10);
    expect(r.vessels[0].mrr).toBeCloseTo(1.5 / 0.9, 10);
  });
});
