import { describe, expect, it } from 'vitest';
import { renderNarrative } from '../../../server/report-document/render';
import { demoReportStudies, viewOf } from './fixtures';

/**
 * Minimum content of a catheterization report, after the ACC/AHA/SCAI 2014 health policy statement on
 * structured reporting for the cardiac catheterization laboratory (Sanborn et al., Circulation
 * 2014;129(24):2578–2609, doi:10.1161/CIR.0000000000000043; also J Am Coll Cardiol 2014). Its abstract
 * says the final report "records key data used to assess indications and appropriateness of care,
 * details technical aspects of the procedure, describes findings and observations, lists results and
 * calculations, provides the interpretation of the study, and conveys patient care recommendations"
 * (wording checked against the published abstract). Complications and the operator as report elements:
 * [memory] of the statement's data elements; the Joint Commission's operative and high-risk procedure
 * report standard (RC.02.01.03) also asks for the findings and the practitioner [memory].
 *
 * Each element is checked in the signed narrative of every demo study, in both media.
 */

const signature = { signedBy: 'Dr. Kofi Oduya', signedAt: '2026-11-30T10:15:00Z', reportVersion: 1, fingerprint: 'c0ffee'.repeat(10) + 'c0ff' };

interface Element {
  name: string;
  /** The heading in the plain-text report, and what the section must hold for this study. */
  check: (text: string, study: ReturnType<typeof demoReportStudies>[number]) => void;
}

const sectionOf = (text: string, heading: string) => {
  const start = text.indexOf(`\n${heading}\n`);
  expect(start, `section ${heading}`).toBeGreaterThan(0);
  const rest = text.slice(start + heading.length + 2);
  const end = rest.search(/\n\n[A-Z][A-Z :]+\n/);
  return end < 0 ? rest : rest.slice(0, end);
};

const elements: Element[] = [
  {
    name: 'indication (and appropriateness: the clinical question)',
    check: (text, s) => {
      const sec = sectionOf(text, 'INDICATION');
      expect(sec).toContain(s.details.indication!);
      expect(sec).toMatch(/^Clinical question: \S/m);
    },
  },
  {
    name: 'technical aspects of the procedure',
    check: (text) => {
      const sec = sectionOf(text, 'PROCEDURE AND TECHNIQUE');
      expect(sec).toMatch(/access; [4-8] Fr guide catheter\./);
      expect(sec).toMatch(/^Hyperaemia with (intravenous|intracoronary) adenosine \d+ µg/m);
      expect(sec).toMatch(/^Drift check, Pd\/Pa with the sensor back at the guide tip: /m);
    },
  },
  {
    name: 'findings and observations (measurements)',
    check: (text, s) => {
      const sec = sectionOf(text, 'MEASUREMENTS');
      const rows = sec.split('\n').slice(2).filter((l) => l.trim());
      expect(rows).toHaveLength(s.vessels.length);
      for (const v of s.vessels) expect(sec).toContain(`${v.hyperemiaPa} / ${v.hyperemiaPd}`);
    },
  },
  {
    name: 'results and calculations (indices)',
    check: (text, s) => {
      const sec = sectionOf(text, 'CALCULATED INDICES');
      expect(sec.split('\n')[0]).toMatch(/^Vessel\s+FFR/);
      expect(sec.split('\n').slice(2).filter((l) => l.trim())).toHaveLength(s.vessels.length);
    },
  },
  {
    name: 'interpretation of the study',
    check: (text, s) => {
      expect(sectionOf(text, 'INTERPRETATION BY VESSEL')).toMatch(/FFR \d\.\d\d: (normal|abnormal) \(cut-off ≤ 0\.80/);
      const conclusion = s.details.clinicalQuestion === 'intermediate-lesion' ? 'CONCLUSION' : 'DIAGNOSIS: CORONARY FUNCTION';
      expect(sectionOf(text, conclusion).trim().length).toBeGreaterThan(10);
      expect(sectionOf(text, 'IMPRESSION')).toContain(s.findings.impression!.slice(0, 40));
    },
  },
  {
    name: 'complications',
    check: (text, s) => {
      const sec = sectionOf(text, 'COMPLICATIONS');
      const kinds = (s.findings as { complicationKinds?: string[] }).complicationKinds ?? [];
      // "None." opens the section unless the free text itself opens by saying there was no complication.
      if (kinds.includes('none')) expect(sec.split('\n')[0]).toBe(/^no complication/i.test(s.findings.complications ?? '') ? s.findings.complications : 'None.');
      if (s.findings.complications && !/^none\.?$/i.test(s.findings.complications)) expect(sec).toContain(s.findings.complications);
      expect(sec).not.toContain('Not recorded.');
    },
  },
  {
    name: 'patient care recommendations',
    check: (text, s) => expect(sectionOf(text, 'RECOMMENDATIONS AND PLAN')).toContain(s.findings.plan!),
  },
  {
    name: 'operator and signature',
    check: (text) => {
      expect(text).toContain('Operator: Dr. Kofi Oduya');
      expect(text).toContain('Electronically signed by Dr. Kofi Oduya on 30 Nov 2026, 10:15 UTC.');
    },
  },
];

describe('minimum report content (ACC/AHA/SCAI 2014 structured reporting statement)', () => {
  for (const study of demoReportStudies()) {
    describe(study.accession, () => {
      const view = viewOf(study, { signature });
      const { text, html } = renderNarrative(view);
      for (const el of elements) {
        it(el.name, () => el.check(text, study));
      }
      it('the HTML carries the same sections', () => {
        for (const cls of ['indication', 'technique', 'measurements', 'indices', 'interpretation', 'complications', 'impression', 'plan', 'signature']) {
          expect(html, cls).toContain(`<section class="${cls}">`);
        }
      });
    });
  }
});
