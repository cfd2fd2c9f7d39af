import { execFileSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import { defaultThresholds } from '../../../shared/physiology';
import { buildReportView, canonicalContent, fingerprint, fingerprintInPdf, PAGE, prepareSignedReport, previewReport, renderNarrative, renderReportPdf, sha256Hex, type SignedContent } from '../../../server/report-document';
import { closePdfThreads, renderPdfInThread } from '../../../server/report-document/pdf-threads';
import { pdfInfo, pdfPages, pdfToPng, pngSize } from '../../support/pdf-to-png';
import { analysisOf, demoReportStudies, viewOf } from './fixtures';

const signature = { signedBy: 'Dr. Kofi Oduya', signedAt: '2026-11-30T10:15:00Z', reportVersion: 1, fingerprint: '9f86d081884c7d659a2feaa0c55ad015a3bf4f1b2b0b822cd15d6c15b0f00a08' };

describe('canonical content and fingerprint', () => {
  it('writes keys sorted, no whitespace, undefined members left out (RFC 8785, JSON Canonicalization Scheme)', () => {
    expect(canonicalContent({ b: 1, a: [1, 'x', true, null], c: undefined })).toBe('{"a":[1,"x",true,null],"b":1}');
    expect(canonicalContent({ b: { d: 2, c: 1 }, a: 'é' })).toBe('{"a":"é","b":{"c":1,"d":2}}');
    // Numbers as ECMAScript writes them (RFC 8785 §3.2.2.3).
    expect(canonicalContent([0.1 + 0.2, 1e21, -0, 5.0])).toBe('[0.30000000000000004,1e+21,0,5]');
    expect(canonicalContent(new Date('2026-11-30T10:15:00Z'))).toBe('"2026-11-30T10:15:00.000Z"');
  });

  it('refuses what JSON cannot hold', () => {
    expect(() => canonicalContent({ x: Number.NaN })).toThrow(/\$\.x is not a finite number/);
    expect(() => canonicalContent({ f: () => 1 })).toThrow(/function/);
  });

  it('is SHA-256 of the canonical JSON (FIPS 180-4; values checked with coreutils sha256sum)', () => {
    expect(fingerprint({ a: 1 })).toBe('015abd7f5cc57a2dd94b7590f04ad8084273905ee33ec5cebeae62276a97f862');
    expect(fingerprint({ b: { d: 1e21, c: 0.1 + 0.2 }, a: [1, 'x', true, null] })).toBe('8270ab2cd8ef23b90ac30565ad3b6952c0492f7aaa2681f08c929e3c284b3135');
    expect(sha256Hex(Buffer.from('{"a":1}'))).toBe(fingerprint({ a: 1 }));
  });
});

describe('the report PDF', () => {
  it('is A4 with the text of the report, Public Sans embedded, and a header and footer on every page', async () => {
    const s = demoReportStudies()[5];
    const pdf = await renderReportPdf(viewOf(s, { signature }));
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    const info = pdfInfo(pdf);
    expect(info['Page size']).toMatch(/^595\.2\d? x 841\.8\d? pts \(A4\)$/); // ISO 216 A4, 210 × 297 mm
    const pages = pdfPages(pdf);
    expect(Number(info.Pages)).toBe(pages.length);
    expect(pages.length).toBeGreaterThanOrEqual(2);
    pages.forEach((page, i) => {
      expect(page, `page ${i + 1}`).toMatch(/MORAVEC, Ilse\s+MRN SB-127711\s+Born 1964-05-23\s+Female\s+Accession SBR-26-0416/);
      expect(page).toContain(`Page ${i + 1} of ${pages.length}`);
      expect(page).toMatch(/Report version 1 · Signed by Dr\. Kofi Oduya · 30 Nov 2026, 10:15 UTC · Fingerprint 9f86-d081-884c-7d65/);
      expect(page).toContain('Report template v1');
    });
    const all = pages.join('\n');
    for (const text of ['Coronary function testing report', 'Measurements', 'Calculated indices', '84 / 76', 'Acetylcholine testing', 'Microvascular angina', 'Decision support only.']) {
      expect(all).toContain(text);
    }
    // A flagged cell carries its flag in words (the table may wrap it under the number).
    expect(all).toMatch(/ 1\.77 [^\n]*\n[^\n]*\(abnormal\)/);
    expect(all.replace(/\s+/g, ' ')).toContain(`Content fingerprint (SHA-256) ${signature.fingerprint}`);
    // The fonts are embedded subsets of Public Sans, not a viewer's substitute.
    const raw = pdf.toString('latin1');
    expect(raw).toMatch(/\/FontName \/[A-Z]{6}\+PublicSans-Regular/);
    expect(raw).toMatch(/\/FontName \/[A-Z]{6}\+PublicSans-Bold/);
    expect(raw).toMatch(/\/FontFile2 \d+ 0 R/);
  });

  it('gives the same bytes for the same input; the creation date is the signing time', async () => {
    const s = demoReportStudies()[0];
    const a = await renderReportPdf(viewOf(s, { signature }));
    const b = await renderReportPdf(viewOf(s, { signature }));
    expect(sha256Hex(a)).toBe(sha256Hex(b));
    expect(pdfInfo(a).CreationDate).toBe('2026-11-30T10:15:00Z');
    const later = await renderReportPdf(viewOf(s, { signature: { ...signature, signedAt: '2026-11-30T10:16:00Z' } }));
    expect(sha256Hex(later)).not.toBe(sha256Hex(a));
  });

  it('gives the same bytes with its fonts shared by earlier documents as with fonts fresh in a new process', async () => {
    const s = demoReportStudies()[5];
    // Other documents first, so the parsed fonts and their remembered word shapes are in use.
    for (const other of demoReportStudies().slice(0, 5)) await renderReportPdf(viewOf(other, { signature }));
    const shared = sha256Hex(await renderReportPdf(viewOf(s, { signature })));
    const script = `
      import { renderReportPdf, sha256Hex } from './server/report-document/index.ts';
      import { demoReportStudies, viewOf } from './tests/unit/report/fixtures.ts';
      const s = demoReportStudies()[5];
      process.stdout.write(sha256Hex(await renderReportPdf(viewOf(s, { signature: JSON.parse(process.argv[1]) }))));`;
    const fresh = execFileSync(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', script, JSON.stringify(signature)], { encoding: 'utf8' });
    expect(fresh).toBe(shared);
  });

  it('leaves the view it renders as it was (the layout engine rewrites the lists it is given in place)', async () => {
    for (const s of demoReportStudies()) {
      const view = viewOf(s, { signature });
      const before = JSON.stringify(view);
      await renderReportPdf(view);
      expect(JSON.stringify(view)).toBe(before);
    }
  });

  it('gives the same bytes rendered in a rendering thread (as a signature renders it) as in this thread', async () => {
    try {
      for (const [i, s] of demoReportStudies().slice(0, 3).entries()) {
        const signed = { ...signature, reportVersion: i + 1 };
        const inThread = await renderPdfInThread(viewOf(s, { signature: signed }));
        expect(sha256Hex(inThread)).toBe(sha256Hex(await renderReportPdf(viewOf(s, { signature: signed }))));
        expect(pdfPages(inThread)[0]).toContain(s.accession);
      }
      // A render still running at its time limit is stopped (its thread replaced) and says so; the next renders.
      await expect(renderPdfInThread(viewOf(demoReportStudies()[0], { signature }), 1)).rejects.toThrow(/was not rendered within/);
      // A render that fails in the thread fails that signature only; the next one renders.
      const broken = viewOf(demoReportStudies()[0], { signature });
      await expect(renderPdfInThread({ ...broken, signature: { ...broken.signature!, signedAtIso: 'not a time' } })).rejects.toThrow(/not a valid time/);
      expect(pdfPages(await renderPdfInThread(viewOf(demoReportStudies()[0], { signature })))[0]).toContain(demoReportStudies()[0].accession);
    } finally {
      await closePdfThreads();
    }
  });

  it('a preview says it is not signed', async () => {
    const pdf = await renderReportPdf(viewOf(demoReportStudies()[1]), { createdAt: '2026-11-30T09:00:00Z' });
    const pages = pdfPages(pdf);
    expect(pages[0]).toContain('Preview: not signed');
    expect(pages.join('\n')).toContain('Coronary physiology report');
    expect(pages.join('\n')).not.toContain('endotype');
  });

  it('escapes nothing into markup and breaks a long impression over pages, header on each', async () => {
    const s = demoReportStudies()[0];
    s.findings.impression = `<b>${'Long impression sentence with words. '.repeat(270)}</b>`;
    const pdf = await renderReportPdf(viewOf(s, { signature }));
    const pages = pdfPages(pdf);
    expect(pages.length).toBeGreaterThanOrEqual(3);
    for (const p of pages) expect(p).toContain('QUENNEVILLE, Harold');
    expect(pages.join(' ')).toContain('<b>Long impression sentence');
  });

  it('renders to PNG pages that can be looked at', async () => {
    const pdf = await renderReportPdf(viewOf(demoReportStudies()[3], { signature }));
    const pngs = pdfToPng(pdf, 'test-results/screenshots', 'report-SBR-26-0414', 60);
    expect(pngs.length).toBe(Number(pdfInfo(pdf).Pages));
    const { width, height } = pngSize(readFileSync(pngs[0]));
    // A4 at 60 dpi: 8.27 × 11.69 in → about 496 × 702 pixels.
    expect(width).toBeGreaterThanOrEqual(495);
    expect(width).toBeLessThanOrEqual(497);
    expect(height).toBeGreaterThanOrEqual(701);
    expect(height).toBeLessThanOrEqual(703);
  });

  it('uses the page set-up it declares', () => {
    expect(PAGE.size).toBe('A4');
    expect(PAGE.margins).toEqual([48, 66, 48, 72]);
  });
});

describe('preparing a signed version', () => {
  const s = demoReportStudies()[2];
  const input = { study: s, analysis: analysisOf(s), thresholds: defaultThresholds, people: { operator: 'Dr. Kofi Oduya' } };
  const sign = { signer: { id: '00000000-0000-4000-8000-000000000001', name: 'Dr. Kofi Oduya' }, signedAt: '2026-11-30T10:15:00Z', reportVersion: 1 };

  it('fingerprints exactly the previewed narrative with the record, analysis, thresholds and signer', async () => {
    const prepared = await prepareSignedReport(input, sign);
    const preview = previewReport(input);
    const content: SignedContent = prepared.content;
    expect(content.narrative).toBe(preview.narrative.text);
    expect(content.templateVersion).toBe('v1');
    expect(content.record).toEqual(s);
    expect(content.signer).toEqual(sign.signer);
    expect(prepared.fingerprint).toBe(createHash('sha256').update(canonicalContent(content)).digest('hex'));
    expect(prepared.narrative.text).toContain(`Content fingerprint ${prepared.fingerprint.slice(0, 4)}-${prepared.fingerprint.slice(4, 8)}-`);
    expect(prepared.pdfSha256).toBe(sha256Hex(prepared.pdf));
    // "Verify" can read the full fingerprint back from the file; a preview carries none.
    expect(fingerprintInPdf(prepared.pdf)).toBe(prepared.fingerprint);
    expect(pdfInfo(prepared.pdf).Subject).toBe(`Report version 1, fingerprint ${prepared.fingerprint}`);
    expect(fingerprintInPdf(await renderReportPdf(preview.view))).toBeNull();
    expect(prepared.htmlDocument.startsWith('<!doctype html>')).toBe(true);
    // The signed view is the previewed one with its signature block: the same as one built whole.
    const whole = buildReportView({ ...input, signature: { signedBy: sign.signer.name, signedAt: sign.signedAt, reportVersion: sign.reportVersion, fingerprint: prepared.fingerprint, amendmentReason: null } });
    expect(prepared.narrative).toEqual(renderNarrative(whole));
    expect(prepared.pdf.equals(await renderReportPdf(whole))).toBe(true);
  });

  it('same input, same bytes; a changed measurement changes the fingerprint', async () => {
    const a = await prepareSignedReport(input, sign);
    const b = await prepareSignedReport(input, sign);
    expect(b.fingerprint).toBe(a.fingerprint);
    expect(b.pdfSha256).toBe(a.pdfSha256);
    const changed = demoReportStudies()[2];
    changed.vessels[0].hyperemiaPd = 74;
    const c = await prepareSignedReport({ ...input, study: changed, analysis: analysisOf(changed) }, sign);
    expect(c.fingerprint).not.toBe(a.fingerprint);
  });
});
