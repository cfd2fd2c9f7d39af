import { describe, expect, it } from 'vitest';
import { documentStrings } from '../../../shared/report/document';
import { reportDocument } from '../../../server/report-document/document';
import { renderNarrative } from '../../../server/report-document/render';
import { demoReportStudies, viewOf } from './fixtures';

// The structured preview must say what the signed narrative says, in the same order (the product's
// own rule: what the physician previews is what is signed — common practice for electronic signatures).

/** The upper-case section headings of the plain-text narrative, in order. */
const textHeadings = (text: string) => text.split('\n').filter((l) => /^[A-Z][A-Z :]+$/.test(l) && l.length > 3);

describe('the report as a structured document', () => {
  it('has the narrative’s sections in the narrative’s order, for every demo study', () => {
    for (const study of demoReportStudies()) {
      const view = viewOf(study);
      const doc = reportDocument(view);
      const headings = doc.sections.map((s) => s.heading).filter((h): h is string => !!h).map((h) => h.toUpperCase());
      // Complications is printed by the text template even when empty; the document leaves an empty section out.
      const expected = textHeadings(renderNarrative(view).text).filter((h) => headings.includes(h) || h !== 'COMPLICATIONS');
      expect(headings, study.accession).toEqual(expected);
    }
  });

  it('holds no string the plain-text narrative does not hold', () => {
    for (const study of demoReportStudies()) {
      const view = viewOf(study);
      const text = renderNarrative(view).text.replace(/ {2,}/g, ' ');
      const doc = reportDocument(view);
      // The text prints thresholds as "label: value (source)" lines, without the table's column names.
      const thresholdColumns = ['Criterion', 'Value', 'Source'];
      // A dose cell holds its number to its unit with a no-break space; the plain text has a plain one.
      for (const s of documentStrings(doc).filter((x) => !thresholdColumns.includes(x)).map((x) => x.replace(/\u00a0/g, ' '))) {
        // Table cells and labels appear padded or followed by ":" in the text; headings in capitals.
        const found = text.includes(s) || text.includes(s.toUpperCase()) || text.replace(/\n/g, ' ').includes(s);
        expect(found, `${study.accession}: "${s}"`).toBe(true);
      }
      expect(doc.footer).toContain('Preview: not signed.');
    }
  });

  it('the measurements table keeps each cell’s flag', () => {
    const doc = reportDocument(viewOf(demoReportStudies()[0]));
    const cells = doc.sections
      .filter((s) => s.key === 'indices' || s.key === 'measurements')
      .flatMap((s) => s.blocks)
      .flatMap((b) => (b.kind === 'table' ? b.rows.flat() : []));
    expect(cells.length).toBeGreaterThan(0);
    // FFR 0.80 or below is abnormal (ESC 2024 chronic coronary syndromes guideline).
    expect(cells.some((c) => c.flag === 'abnormal')).toBe(true);
  });

  it('keeps the physician’s free text as the very characters typed: markup stays text', () => {
    const markup = '<script>alert("x")</script><b onclick=steal()>bold</b> & <img src=x onerror=alert(1)>';
    const s = demoReportStudies()[0];
    s.findings.impression = markup;
    s.findings.plan = markup;
    const doc = reportDocument(viewOf(s));
    const impression = doc.sections.find((x) => x.key === 'impression')!;
    expect(impression.blocks).toEqual([{ kind: 'paragraph', text: expect.stringContaining('<script>alert("x")</script>') }]);
    expect(JSON.stringify(doc)).not.toContain('&lt;');
  });

  it('a signed view carries the signature line instead of the preview mark', () => {
    const doc = reportDocument(
      viewOf(demoReportStudies()[0], { signature: { signedBy: 'Dr. Kofi Oduya', signedAt: '2026-12-02T14:05:00Z', reportVersion: 1, fingerprint: 'a'.repeat(64) } }),
    );
    expect(doc.footer[0]).toMatch(/^Electronically signed by Dr\. Kofi Oduya on .+ Report version 1\. Content fingerprint aaaa-aaaa-aaaa-aaaa\.$/);
    expect(doc.footer).not.toContain('Preview: not signed.');
  });
});
