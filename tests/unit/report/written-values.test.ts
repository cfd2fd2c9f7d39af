import { describe, expect, it } from 'vitest';
import { writtenValueMismatches } from '../../../shared/report/written-values';
import type { VesselResult } from '../../../shared/physiology/types';

// A report's free text must not contradict its measurements (common practice: the impression restates
// the indices the table shows, per vessel). Values are judged at the report's display precision (ratios
// 2 decimals, IMR a whole number — common practice) or at the precision the physician wrote, if finer.
const vessel = (over: Partial<VesselResult>): VesselResult => ({ id: 'v1', vessel: 'LAD', warnings: [], ...over });
const lad = { vessels: [vessel({ ffr: 0.78, cfr: 2.46, imr: 21.6 })] };
const two = { vessels: [vessel({ ffr: 0.78, cfr: 1.84, imr: 28.4, imrUncorrected: 35.2 }), vessel({ id: 'v2', vessel: 'RCA', ffr: 0.91 })] };
const check = (impression: string, analysis = two) => writtenValueMismatches({ impression }, analysis);
const quotes = (impression: string, analysis = two) => check(impression, analysis).map((m) => m.written);

describe('numbers written beside an index name in the impression and plan', () => {
  it('says when the impression gives a value no vessel measured, naming what was measured', () => {
    const [m, ...rest] = check('Significant LAD lesion, FFR 0.86. Stent.', lad);
    expect(rest).toEqual([]);
    expect(m).toMatchObject({ field: 'impression', index: 'FFR', written: 'FFR 0.86', vessel: 'LAD', measured: ['LAD 0.78'] });
    expect(m.message).toBe('The impression says “FFR 0.86”, but this study measured FFR LAD 0.78. Check the text before signing.');
  });

  it('accepts the value as printed, with linking words, brackets, a leading point or a decimal comma', () => {
    for (const text of ['FFR of 0.78 in the LAD; CFR was 2.46; IMR = 22 U.', 'ffr 0,78, CFR (2.46), IMR: 22', 'FFR ~.78', 'FFR measured 0.78'])
      expect(check(text, lad)).toEqual([]);
  });

  it('never accepts fewer decimals than printed when they hide a different value ("FFR 0.8" is not 0.84; "CFR 2" is not 1.6)', () => {
    expect(check('FFR 0.8 (significant)', { vessels: [vessel({ ffr: 0.8 })] })).toEqual([]);
    expect(quotes('FFR 0.8 (significant)', { vessels: [vessel({ ffr: 0.84 })] })).toEqual(['FFR 0.8']);
    expect(quotes('CFR 2', { vessels: [vessel({ cfr: 1.6 })] })).toEqual(['CFR 2']);
    expect(quotes('CFR 2.5', lad)).toEqual(['CFR 2.5']); // 2.46 prints as 2.46, and 2.5 is the cut-off some labs use
  });

  it('reads a whole-number IMR at its display precision (21.6 prints as 22), and finer writing at its own', () => {
    expect(check('IMR 21.6, IMR 22, IMR 22.0', lad)).toEqual([]);
    expect(check('IMR 24.5', lad)[0].measured).toEqual(['LAD 22']);
    expect(check('IMR 25.0', { vessels: [vessel({ imr: 24.5 })] })).toEqual([]); // prints as 25
  });

  it('compares a value given to a vessel with that vessel only: swapped vessels are caught', () => {
    expect(check('FFR was 0.78 in the LAD and 0.91 in the RCA.')).toEqual([]);
    expect(check('LAD FFR 0.78, RCA FFR 0.91.')).toEqual([]);
    expect(check('FFR 0.78 LAD, 0.91 RCA')).toEqual([]);
    expect(check('FFR: LAD 0.78')).toEqual([]);
    const swapped = check('FFR was 0.91 in the LAD and 0.78 in the RCA.');
    expect(swapped.map((m) => [m.written, m.vessel, m.measured])).toEqual([
      ['FFR was 0.91 in the LAD', 'LAD', ['LAD 0.78']],
      ['FFR … 0.78 in the RCA', 'RCA', ['RCA 0.91']],
    ]);
    expect(check('LAD FFR 0.91, RCA FFR 0.78.').map((m) => m.vessel)).toEqual(['LAD', 'RCA']);
    const unmeasured = check('Circumflex FFR 0.85.');
    expect(unmeasured[0].message).toBe('The impression says “FFR 0.85”, but this study measured no FFR in the LCx (FFR LAD 0.78, RCA 0.91). Check the text before signing.');
  });

  it('reads every number of a list and a range', () => {
    expect(quotes('FFR of 0.78 and 0.85')).toEqual(['FFR … 0.85']);
    expect(quotes('FFR 0.78/0.86')).toEqual(['FFR … 0.86']);
    expect(check('IMR 25–30 in the LAD')).toEqual([]);
    expect(quotes('IMR 30-35 in the LAD')).toEqual(['IMR 30-35 in the LAD']);
  });

  it('does not read cut-offs, or values of another time or state', () => {
    for (const text of [
      'FFR ≤ 0.80 is significant; CFR < 2.0 would be abnormal.',
      'CFR 2.0 cut-off; IMR 40 threshold not reached.',
      'Previous FFR 0.82 (2024). Post-PCI FFR 0.93. Target FFR 0.90 after PCI.',
      'FFR 0.90 after stenting.',
      'FFR after stenting was 0.93.',
      'FFR 0.82 (2024).',
    ])
      expect(check(text)).toEqual([]);
    // The value before an arrow is read; the one after it (after treatment) is not.
    expect(check('LAD FFR 0.78→0.92')).toEqual([]);
    expect(quotes('LAD FFR 0.75 -> 0.92')).toEqual(['FFR 0.75']);
  });

  it('compares an uncorrected IMR with the uncorrected value, and says when an unqualified one is the uncorrected', () => {
    expect(check('Corrected IMR 28, uncorrected IMR 35.')).toEqual([]);
    expect(check('IMR 35 U (uncorrected).')).toEqual([]);
    const [m] = check('IMR 35.');
    expect(m.message).toBe('The impression says “IMR 35”: that is the uncorrected IMR; the report’s IMR is LAD 28. Check the text before signing.');
  });

  it('says when the text names an index this study did not measure, in the plan too', () => {
    const [m] = writtenValueMismatches({ plan: 'Repeat if RRR 1.8 is confirmed.' }, lad);
    expect(m).toMatchObject({ field: 'plan', index: 'RRR', measured: [] });
    expect(m.message).toBe('The plan says “RRR 1.8”, but this study measured no RRR. Check the text before signing.');
  });

  it('quotes text across a line break with its spaces collapsed, and is empty without free text', () => {
    expect(quotes('Significant lesion,\nFFR\n0.86')).toEqual(['FFR 0.86']);
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
