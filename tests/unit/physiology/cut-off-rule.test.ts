import { describe, expect, it } from 'vitest';
import { referenceRange } from '../../../fhir/report-bundle';
import { thresholdText } from '../../../server/report-document/view-model';
import { analyzeStudy, defaultThresholds, type PhysiologyInput, type Thresholds, type VesselResult } from '../../../shared/physiology';
import { indexCutOffKeys, type IndexCutOffKey } from '../../../shared/physiology/thresholds';

type VesselIn = PhysiologyInput['vessels'][number];

/*
 * Each index judged at its own cut-off: the analysis's flag, the symbol the report prints before the
 * cut-off and the FHIR reference range must say the same about the cut-off value itself. The published
 * direction of each cut-off, at the default value:
 */
const published: Record<IndexCutOffKey, { abnormalAtCut: boolean; source: string }> = {
  ffr: { abnormalAtCut: true, source: 'ESC 2024 chronic coronary syndromes guideline; EAPCI 2020; FAME (FFR ≤ 0.80)' },
  restingPdPa: { abnormalAtCut: true, source: 'CONTRAST (whole-cycle resting Pd/Pa ≤ 0.91)' },
  nhprWholeCycle: { abnormalAtCut: true, source: 'CONTRAST (whole-cycle resting ratio ≤ 0.91)' },
  nhprDiastolic: { abnormalAtCut: true, source: 'DEFINE-FLAIR and the SWEDEHEART-based trial, 2017; EAPCI 2020 (≤ 0.89)' },
  nhprFullCycleMinimum: { abnormalAtCut: true, source: 'validation studies summarised in an Open Heart review; EAPCI 2020 (≤ 0.89)' },
  cfr: { abnormalAtCut: false, source: 'EAPCI 2020 (thermodilution CFR < 2.0)' },
  imr: { abnormalAtCut: true, source: 'ESC 2024; EAPCI 2020 (IMR ≥ 25)' },
  rrr: { abnormalAtCut: false, source: 'Lee et al., JAHA 2020 (formula); cut-off < 2.0 [memory: CorMicA]' },
  mrr: { abnormalAtCut: false, source: 'de Vos et al., JACC Cardiovasc Imaging 2023 (continuous thermodilution: < 2.1 rules in)' },
};

const three = (x: number) => [x, x, x];

/**
 * A vessel whose index equals `cut`, from the published formulas: FFR and resting Pd/Pa = Pd/Pa
 * (Pijls et al., NEJM 1996); CFR = Tmn rest / Tmn hyperaemia (EAPCI 2020); IMR = Pd × Tmn hyperaemia
 * (EAPCI 2020); RRR = CFR × Pd rest / Pd hyperaemia (Lee et al., JAHA 2020); MRR = CFR / FFR × Pa rest /
 * Pa hyperaemia (De Bruyne et al. 2021) — with equal pressures RRR and MRR equal the CFR.
 */
function atCut(key: IndexCutOffKey, cut: number): { input: Partial<VesselIn>; flag: (v: VesselResult) => string | undefined } {
  const thermo = { rest: { pa: 100, pd: 100, tmn: three(0.3 * cut) }, hyperemia: { pa: 100, pd: 100, tmn: three(0.3) } };
  switch (key) {
    case 'ffr':
      return { input: { hyperemia: { pa: 100, pd: 100 * cut } }, flag: (v) => v.ffrFlag };
    case 'restingPdPa':
      return { input: { rest: { pa: 100, pd: 100 * cut } }, flag: (v) => v.restingPdPaFlag };
    case 'nhprWholeCycle':
      return { input: { nhpr: { kind: 'whole-cycle', value: cut } }, flag: (v) => v.nhprFlag };
    case 'nhprDiastolic':
      return { input: { nhpr: { kind: 'diastolic', value: cut } }, flag: (v) => v.nhprFlag };
    case 'nhprFullCycleMinimum':
      return { input: { nhpr: { kind: 'full-cycle-minimum', value: cut } }, flag: (v) => v.nhprFlag };
    case 'cfr':
      return { input: thermo, flag: (v) => v.cfrFlag };
    case 'imr':
      return { input: { hyperemia: { pa: 100, pd: 100, tmn: three(cut / 100) } }, flag: (v) => v.imrFlag };
    case 'rrr':
      return { input: thermo, flag: (v) => v.rrrFlag };
    case 'mrr':
      return { input: thermo, flag: (v) => v.mrrFlag };
  }
}

const judged = (key: IndexCutOffKey, t: Thresholds, cut: number) => {
  const { input, flag } = atCut(key, cut);
  return flag(analyzeStudy({ vessels: [{ id: 'v1', vessel: 'LAD', ...input }], thresholds: t }).vessels[0]);
};

/** Whether the FHIR reference range leaves the value outside the normal range. */
function outsideNormal(key: IndexCutOffKey, t: Thresholds, value: number): boolean {
  const range = referenceRange(key, t);
  if (range.low) return value < range.low.value!;
  return value > range.high!.value!;
}

/** Whether the printed cut-off includes the cut-off value itself in the abnormal side. */
function printedIncludesCut(key: IndexCutOffKey, t: Thresholds): boolean {
  const printed = thresholdText(key, t).value;
  const symbol = printed.trim().charAt(0);
  expect(['≤', '<', '≥'], `${key}: ${printed}`).toContain(symbol);
  return symbol !== '<';
}

describe('an index at its own cut-off', () => {
  // Borderline bands off (each limit equal to its cut-off, the defaults for CFR), so the cut-off alone decides.
  const t: Thresholds = { ...defaultThresholds, cfrBorderline: defaultThresholds.cfr, mrrBorderline: defaultThresholds.mrr };

  it.each(indexCutOffKeys)('%s: the flag, the printed cut-off and the FHIR reference range agree', (key) => {
    const cut = t[key];
    const flag = judged(key, t, cut);
    expect(flag === 'abnormal', `${key} flag at ${cut}: ${published[key].source}`).toBe(published[key].abnormalAtCut);
    expect(['normal', 'abnormal'], `${key} flag at ${cut}`).toContain(flag);
    expect(printedIncludesCut(key, t), `${key} printed: ${thresholdText(key, t).value}`).toBe(published[key].abnormalAtCut);
    expect(outsideNormal(key, t, cut), `${key} reference range: ${referenceRange(key, t).text}`).toBe(published[key].abnormalAtCut);
  });

  it('every index with a cut-off is checked', () => {
    expect([...indexCutOffKeys].sort()).toEqual(Object.keys(published).sort());
  });
});

describe('a borderline band at its upper limit', () => {
  // CFR 2.0–2.5 borderline when a lab raises the limit to 2.5 (ESC 2024 uses < 2.5): 2.5 itself is normal.
  // MRR 2.1–2.7 borderline (de Vos et al., JACC Cardiovasc Imaging 2023: > 2.7 rules out): 2.7 itself is borderline.
  const t: Thresholds = { ...defaultThresholds, cfrBorderline: 2.5 };

  it('CFR at 2.50: the flag and the FHIR normal range both call it normal; the report prints the band as "< 2.50"', () => {
    expect(judged('cfr', t, 2.5)).toBe('normal');
    expect(outsideNormal('cfr', t, 2.5)).toBe(false);
    expect(thresholdText('cfrBorderline', t).value).toMatch(/to < 2\.50$/);
  });

  it('MRR at 2.70: borderline by the flag, outside the FHIR normal range', () => {
    expect(judged('mrr', t, 2.7)).toBe('borderline');
    expect(outsideNormal('mrr', t, 2.7)).toBe(true);
  });
});
