import { describe, expect, it } from 'vitest';
import { checkCompleteness, missingSummary } from '../../../shared/report/completeness';
import { emptyDose, emptyVessel } from '../../../shared/study/schema';
import { demoReportStudies as demoStudies } from './fixtures';

/**
 * What must be recorded before signing. The items follow the minimum content of a catheterization
 * report (ACC/AHA/SCAI 2014 health policy statement on structured reporting, Sanborn et al.,
 * Circulation 2014;129:2578, doi:10.1161/CIR.0000000000000043: indication, technique, findings,
 * calculations, interpretation, complications, recommendations) and the quality steps of a pressure
 * wire study (drift check: Cook et al., Circ Cardiovasc Interv 2016).
 */

/**
 * The demo studies with their complications recorded as the form records them: where the record has
 * the list of kinds and it is still empty, a free text of "None…" becomes the explicit "none" and any
 * other text becomes "other" with that text as its description.
 */
const demoReportStudies = () =>
  demoStudies().map((s) => {
    const f = s.findings as typeof s.findings & { complicationKinds?: string[] };
    if (Array.isArray(f.complicationKinds) && f.complicationKinds.length === 0 && f.complications) {
      f.complicationKinds = /^none\b/i.test(f.complications) ? ['none'] : ['other'];
    }
    return s;
  });

const paths = (s: Parameters<typeof checkCompleteness>[0]) => checkCompleteness(s).missing.map((m) => m.path);

describe('completeness before signing', () => {
  it('a complete demo study has nothing missing', () => {
    for (const study of demoReportStudies()) {
      const result = checkCompleteness(study);
      expect(result.missing, study.accession).toEqual([]);
      expect(result.complete).toBe(true);
      expect(missingSummary(result)).toBeNull();
    }
  });

  it('returns every missing item at once, each with the path of its field', () => {
    const s = demoReportStudies()[3];
    s.details.indication = '  ';
    s.details.clinicalQuestion = null;
    s.details.operatorId = null;
    s.vessels[0].driftPdPa = null;
    s.vessels.push(emptyVessel('00000000-0000-4000-8000-000000009999', 'RCA'));
    s.vasoreactivity.doses[1].constrictionPct = null;
    s.vasoreactivity.doses[2].symptoms = null;
    s.findings.impression = null;
    s.findings.plan = '';
    const result = checkCompleteness(s);
    expect(result.complete).toBe(false);
    expect(result.missing.map((m) => m.path)).toEqual([
      'details/indication',
      'details/clinicalQuestion',
      'details/operatorId',
      'vessels/0/driftPdPa',
      'vessels/1/restPa',
      'vasoreactivity/doses/1/constrictionPct',
      'vasoreactivity/doses/2/symptoms',
      'findings/impression',
      'findings/plan',
    ]);
    // The form library's name for the same field, and the section that holds it.
    const drift = result.missing.find((m) => m.code === 'drift-check')!;
    expect(drift.field).toBe('vessels.0.driftPdPa');
    expect(drift.section).toBe('vessels');
    expect(drift.message).toMatch(/vessel 1 \(LAD\).*not done/);
    expect(missingSummary(result)).toBe('9 items are missing before the report can be signed.');
    expect(missingSummary({ missing: result.missing.slice(0, 1) })).toBe('1 item is missing before the report can be signed.');
  });

  it('a vessel without a pressure index (transit times only) needs no drift check', () => {
    const s = demoReportStudies()[2];
    const v = s.vessels[0];
    Object.assign(v, { restPa: null, restPd: null, hyperemiaPa: null, hyperemiaPd: null, consoleFfr: null, driftPdPa: null });
    expect(paths(s)).toEqual([]);
  });

  it('each kind of pressure index asks for the drift check', () => {
    const cases: Array<[string, Partial<ReturnType<typeof emptyVessel>>]> = [
      ['resting pressures', { restPa: 95, restPd: 88 }],
      ['hyperaemic pressures', { hyperemiaPa: 90, hyperemiaPd: 70 }],
      ['console FFR', { consoleFfr: 0.78 }],
      ['resting ratio', { nhprKind: 'diastolic', nhprValue: 0.9 }],
    ];
    for (const [what, fields] of cases) {
      const s = demoReportStudies()[0];
      s.vessels = [{ ...emptyVessel('00000000-0000-4000-8000-000000000001', 'LAD'), ...fields }];
      expect(paths(s), what).toEqual(['vessels/0/driftPdPa']);
    }
  });

  it('a drift check marked "not done" with a reason is accepted; without a reason it is not', () => {
    const s = demoReportStudies()[0];
    s.vessels[0].driftPdPa = null;
    (s.vessels[0] as { driftNotDoneReason?: string | null }).driftNotDoneReason = '   ';
    expect(paths(s)).toEqual(['vessels/0/driftPdPa']);
    (s.vessels[0] as { driftNotDoneReason?: string | null }).driftNotDoneReason = 'Wire lost distal position during pull-back';
    expect(paths(s)).toEqual([]);
  });

  it('a resting ratio value without its kind is not a measurement', () => {
    const s = demoReportStudies()[0];
    s.vessels = [{ ...emptyVessel('00000000-0000-4000-8000-000000000001', 'LAD'), nhprValue: 0.9 }];
    expect(paths(s)).toEqual(['vessels/0/restPa']);
  });

  it('a study with no vessel is incomplete', () => {
    const s = demoReportStudies()[0];
    s.vessels = [];
    expect(paths(s)).toEqual(['vessels']);
  });

  it('an acetylcholine dose lists each missing observation', () => {
    const s = demoReportStudies()[2];
    s.vasoreactivity.doses.push(emptyDose('00000000-0000-4000-8000-000000000077', 'LAD'));
    expect(paths(s)).toEqual(['vasoreactivity/doses/3/micrograms', 'vasoreactivity/doses/3/constrictionPct', 'vasoreactivity/doses/3/symptoms', 'vasoreactivity/doses/3/ischemicEcg']);
  });

  describe('complications (an empty field is never read as "none")', () => {
    it('with the list of kinds: empty is missing, "none" is recorded', () => {
      const s = demoReportStudies()[0];
      const f = s.findings as typeof s.findings & { complicationKinds?: string[] };
      f.complicationKinds = [];
      f.complications = null;
      expect(paths(s)).toEqual(['findings/complicationKinds']);
      // Free text alone does not stand in for the explicit choice.
      f.complications = 'Nothing of note';
      expect(paths(s)).toEqual(['findings/complicationKinds']);
      f.complicationKinds = ['none'];
      f.complications = null;
      expect(paths(s)).toEqual([]);
    });

    it('"other" needs its description', () => {
      const s = demoReportStudies()[0];
      const f = s.findings as typeof s.findings & { complicationKinds?: string[] };
      f.complicationKinds = ['dissection', 'other'];
      f.complications = null;
      expect(paths(s)).toEqual(['findings/complications']);
      f.complications = 'Transient vasovagal reaction';
      expect(paths(s)).toEqual([]);
    });

    it('without the list of kinds, the free text must say something', () => {
      const s = demoReportStudies()[0];
      const f = s.findings as Record<string, unknown>;
      delete f.complicationKinds;
      f.complications = ' ';
      expect(paths(s)).toEqual(['findings/complications']);
      f.complications = 'None.';
      expect(paths(s)).toEqual([]);
    });
  });
});
