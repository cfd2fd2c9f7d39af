import { describe, expect, it } from 'vitest';
import { writtenValueMismatches } from '../../../shared/report/written-values';
import type { VesselResult } from '../../../shared/physiology/types';

// A report's free text must not contradict its measurements (common practice: the impression restates
// the indices the table shows). Values are judged at the report's display precision (ratios 2
// decimals, IMR a whole number — common practice) or at the precision the physician wrote.
const vessel = (over: Partial<VesselResult>): VesselResult => ({ id: 'v1', vessel: 'LAD', warnings: [], ...over });
const lad = { vessels: [vessel({ ffr: 0.78, cfr: 2.46, imr: 21.6 })] };

describe('numbers written beside an index name in the impression and plan', () => {
  it('says when the impression gives a value no vessel measured, naming what was measured', () => {
    const [m, ...rest] = writtenValueMismatches({ impression: 'Significant LAD lesion, FFR 0.86. Stent.' }, lad);
    expect(rest).toEqual([]);
    expect(m).toMatchObject({ field: 'impression', index: 'FFR', written: 'FFR 0.86', measured: ['LAD 0.78'] });
    expect(m.message).toBe('The impression says “FFR 0.86”, but the measured FFR is LAD 0.78: check the text before signing.');
  });

  it('accepts the measured value as printed, or rounded to the decimals written, with linking words or a decimal comma', () => {
    expect(writtenValueMismatches({ impression: 'FFR of 0.78 in the LAD; CFR was 2.46; IMR = 22 U.' }, lad)).toEqual([]);
    expect(writtenValueMismatches({ impression: 'ffr 0,78, CFR 2.5, IMR: 22' }, lad)).toEqual([]);
  });

  it('reads a whole-number IMR at its display precision (21.6 prints as 22)', () => {
    expect(writtenValueMismatches({ impression: 'IMR 21.6' }, lad)).toEqual([]);
    const [m] = writtenValueMismatches({ impression: 'Raised IMR 40.' }, lad);
    expect(m.measured).toEqual(['LAD 22']);
  });

  it('does not read a cut-off stated with a comparison ("FFR ≤ 0.80", "CFR < 2.0")', () => {
    expect(writtenValueMismatches({ impression: 'FFR ≤ 0.80 is significant; CFR < 2.0 would be abnormal.' }, lad)).toEqual([]);
  });

  it('says when the text names an index this study did not measure', () => {
    const [m] = writtenValueMismatches({ plan: 'Repeat if RRR 1.8 is confirmed.' }, lad);
    expect(m).toMatchObject({ field: 'plan', index: 'RRR', measured: [] });
    expect(m.message).toBe('The plan says “RRR 1.8”, but no RRR was measured in this study: check the text before signing.');
  });

  it('matches any of several vessels, and lists them all when none agrees', () => {
    const two = { vessels: [vessel({ ffr: 0.78 }), vessel({ id: 'v2', vessel: 'RCA', ffr: 0.91 })] };
    expect(writtenValueMismatches({ impression: 'RCA FFR 0.91, not significant.' }, two)).toEqual([]);
    expect(writtenValueMismatches({ impression: 'FFR 0.85.' }, two)[0].measured).toEqual(['LAD 0.78', 'RCA 0.91']);
  });

  it('is empty without free text', () => {
    expect(writtenValueMismatches({ impression: null, plan: '' }, lad)).toEqual([]);
  });
});

describe('the demo studies', () => {
  it('have impressions and plans that agree with their measurements', async () => {
    const { demoReportStudies, analysisOf } = await import('./fixtures');
    const checked = demoReportStudies().filter((s) => s.findings.impression);
    expect(checked.length).toBeGreaterThan(3);
    for (const s of checked) expect({ accession: s.accession, mismatches: writtenValueMismatches(s.findings, analysisOf(s)) }).toEqual({ accession: s.accession, mismatches: [] });
  });
});
