import { describe, expect, it } from 'vitest';
import { defaultThresholds } from '../../../shared/physiology';
import { findingsSchema, emptySetup, emptyVessel } from '../../../shared/study/schema';
import { htmlDocument, renderNarrative } from '../../../server/report-document/render';
import { REPORT_TEMPLATE_VERSION } from '../../../server/report-document/template-version';
import { buildReportView, reportKindOf } from '../../../server/report-document/view-model';
import { analysisOf, demoReportStudies, render, section, viewOf } from './fixtures';

/** Signs of a sentence or cell left empty by missing data. */
function expectNoHoles(text: string, html: string) {
  const prose = text.replace(/ {2,}/g, ' '); // table padding is not a hole
  for (const bad of ['undefined', 'null', 'NaN', '[object', '()', ' ,', ' .', ': .', ';;', ', ,']) {
    expect(prose.includes(bad), `text holds "${bad}"`).toBe(false);
  }
  expect(text).not.toMatch(/^(?!Reasons:$).*:[ \t]*$/m); // a label with nothing after it
  expect(html).not.toMatch(/<(p|li|td|dd|h2|h3)[^>]*>\s*<\/\1>/);
  expect(html).not.toMatch(/undefined|NaN|\[object/);
}

describe('report kind follows the clinical question', () => {
  it.each([
    ['intermediate-lesion', 'lesion'],
    ['post-pci', 'lesion'],
    ['angina-no-obstruction', 'coronary-function'],
  ] as const)('%s → %s', (question, kind) => {
    const s = demoReportStudies()[2];
    s.details.clinicalQuestion = question;
    expect(reportKindOf(s)).toBe(kind);
  });
  it('"other" or unrecorded: thermodilution or acetylcholine make it a coronary function report', () => {
    const cf = demoReportStudies()[2];
    cf.details.clinicalQuestion = null;
    expect(reportKindOf(cf)).toBe('coronary-function');
    const lesion = demoReportStudies()[0];
    lesion.details.clinicalQuestion = 'other';
    expect(reportKindOf(lesion)).toBe('lesion');
  });
});

describe('template sections', () => {
  const [lad, rca, structural, spasm, normal, functional] = demoReportStudies();

  it('records the template version in the HTML and the text', () => {
    const n = render(lad);
    expect(n.templateVersion).toBe(REPORT_TEMPLATE_VERSION);
    expect(n.html).toContain(`data-template-version="${REPORT_TEMPLATE_VERSION}"`);
    expect(n.text).toContain(`Report template ${REPORT_TEMPLATE_VERSION}`);
    expect(htmlDocument(viewOf(lad), n.html)).toContain(`<meta name="report-template-version" content="${REPORT_TEMPLATE_VERSION}">`);
  });

  it('identification: patient, accession, operator, referring clinician', () => {
    const { text } = render(lad);
    expect(text).toContain('Patient: QUENNEVILLE, Harold');
    expect(text).toContain('MRN: SB-104233');
    expect(text).toContain('Birth date: 1956-03-14');
    expect(text).toContain('Accession: SBR-26-0411');
    expect(text).toContain('Operator: Dr. Kofi Oduya');
    expect(text).toContain('Referring clinician: Dr. Wendell Osei-Marsh');
  });

  it('indication and clinical question', () => {
    const ind = section(render(lad).text, 'INDICATION')!;
    expect(ind).toContain('Intermediate proximal LAD lesion on angiography, exertional angina');
    expect(ind).toContain('Clinical question: Intermediate lesion: is it significant?');
  });

  it('technique: access, guide, anticoagulation, nitrates, hyperaemia, wire position, equalization, drift', () => {
    const t = section(render(lad).text, 'PROCEDURE AND TECHNIQUE')!;
    expect(t).toContain('Right radial access; 6 Fr guide catheter.');
    expect(t).toContain('Heparin 5000 U (60 U/kg).'); // 5000 U / 84 kg = 59.5 U/kg
    expect(t).toContain('Nitroglycerin 200 µg given before the measurements.');
    expect(t).toContain('Baseline: heart rate 68 bpm, blood pressure 132/74 mmHg, sinus rhythm, LVEDP 14 mmHg.');
    expect(t).toContain('Hyperaemia with intravenous adenosine 140 µg/kg/min.');
    expect(t).toContain('Pressure wire sensor: distal third of the vessel.');
    expect(t).toContain('Transducer zeroed at heart level; pressures equalized with the sensor in the aorta, introducer removed.');
    // Drift window 0.98–1.02 [memory]; drift > 2 mmHg means repeat (Cook et al., Circ Cardiovasc Interv 2016).
    expect(t).toContain('Drift check, Pd/Pa with the sensor back at the guide tip: LAD 0.99 (within 0.98–1.02).');
    expect(t).toContain('Totals: contrast 145 mL, fluoroscopy 14.5 min, air kerma 420 mGy, dose-area product 38.5 Gy·cm².');
  });

  it('technique: a drift check out of the window and one not done with its reason', () => {
    const t = section(render(functional).text, 'PROCEDURE AND TECHNIQUE')!;
    expect(t).toContain('LAD 0.99 (within 0.98–1.02); LCx 1.03 (outside 0.98–1.02)');
    const s = demoReportStudies()[5];
    s.vessels[1].driftPdPa = null;
    (s.vessels[1] as { driftNotDoneReason?: string }).driftNotDoneReason = 'Wire lost distal position';
    expect(section(render(s).text, 'PROCEDURE AND TECHNIQUE')).toContain('LCx not done (Wire lost distal position)');
    // Judged as entered, like the screens' drift banner (window 0.98–1.02, common practice): 1.024 is
    // outside, and printed to three decimals so the number and the word agree.
    const edge = demoReportStudies()[5];
    edge.vessels[1].driftPdPa = 1.024;
    expect(section(render(edge).text, 'PROCEDURE AND TECHNIQUE')).toContain('LCx 1.024 (outside 0.98–1.02)');
    edge.vessels[1].driftPdPa = 1.02;
    expect(section(render(edge).text, 'PROCEDURE AND TECHNIQUE')).toContain('LCx 1.02 (within 0.98–1.02)');
  });

  it('technique: intracoronary adenosine in µg and thermodilution injections', () => {
    expect(section(render(rca).text, 'PROCEDURE AND TECHNIQUE')).toContain('Hyperaemia with intracoronary adenosine 100 µg.');
    expect(section(render(structural).text, 'PROCEDURE AND TECHNIQUE')).toContain(
      'Bolus thermodilution with room-temperature saline, injections: LAD 3 at rest and 3 at hyperaemia.',
    );
  });

  it('measurements and calculated indices tables, one row per vessel, numbers at display precision', () => {
    const { text, html } = render(functional);
    const m = section(text, 'MEASUREMENTS')!;
    expect(m.split('\n')[0]).toMatch(/^Vessel\s+Segment\s+Visual stenosis\s+Pa \/ Pd at rest \(mmHg\)\s+Pa \/ Pd at hyperaemia \(mmHg\)\s+Mean Tmn at rest \(s\)\s+Mean Tmn at hyperaemia \(s\)$/);
    expect(m).toMatch(/^LAD\s+Mid LAD\s+15 %\s+92 \/ 87\s+84 \/ 76\s+0\.39\s+0\.22$/m);
    // The circumflex has no transit times: its cells show a dash, the row stays.
    expect(m).toMatch(/^LCx\s+Distal circumflex|^LCx\s+segment 13|^LCx\s+Mid and distal LCx/m);
    const idx = section(text, 'CALCULATED INDICES')!;
    // Display precision: ratios 2 decimals, IMR a whole number (shared precision rule).
    expect(idx).toMatch(/^LAD\s+0\.90\s+0\.95\s+1\.77 \(abnormal\)\s+17\s+/m);
    expect(html).toContain('<td class="flag-abnormal">1.77 <span class="flag">(abnormal)</span></td>');
  });

  it('interpretation per vessel names the threshold it was judged against', () => {
    const i = section(render(lad).text, 'INTERPRETATION BY VESSEL')!;
    // FFR ≤ 0.80 (ESC 2024); diastolic ratio ≤ 0.89 (DEFINE-FLAIR; EAPCI 2020); whole-cycle Pd/Pa ≤ 0.91 (CONTRAST).
    expect(i).toContain('FFR 0.72: abnormal (cut-off ≤ 0.80, ESC 2024).');
    expect(i).toContain('Diastolic ratio 0.84: abnormal (cut-off ≤ 0.89, DEFINE-FLAIR; EAPCI 2020).');
    expect(i).toContain('Resting whole-cycle Pd/Pa from the pressures 0.88: abnormal (cut-off ≤ 0.91, CONTRAST).');
    expect(i).toContain('The lesion is haemodynamically significant (judged by FFR).');
    expect(i).toContain('Pull-back: focal step-up.');
    expect(i).toContain('Decision: treat (coronary intervention).');
  });

  it('a lab threshold that differs from the default is cited as the lab setting', () => {
    const s = demoReportStudies()[2];
    const thresholds = { ...defaultThresholds, cfr: 2.5 };
    const view = buildReportView({ study: s, analysis: analysisOf(s, thresholds), thresholds, people: { operator: 'Dr. Kofi Oduya' } });
    const { text } = renderNarrative(view);
    expect(text).toContain('(cut-off < 2.50, lab setting)');
    expect(text).toContain('- CFR abnormal: < 2.50 (lab setting)');
  });

  it('hand-computed case A: FFR 0.80 at the boundary, corrected IMR, RRR and MRR', () => {
    // Pa/Pd rest 100/95, hyp 90/72, Tmn rest 0.90 s, hyp 0.30 s, computed by hand from the published
    // formulas (not from a paper): FFR 0.80 (abnormal, ≤ 0.80, ESC 2024), CFR 3.00, IMR 21.6 → 22,
    // Yong-corrected 20.52 → 21 (used as FFR ≤ 0.80), RRR 3.96 (Lee et al., JAHA 2020), MRR 4.17 (De Bruyne 2021).
    const s = demoReportStudies()[2];
    s.vessels = [{ ...emptyVessel(s.vessels[0].id, 'LAD'), restPa: 100, restPd: 95, hyperemiaPa: 90, hyperemiaPd: 72, restTransit: [0.9, 0.9, 0.9], hyperemiaTransit: [0.3, 0.3, 0.3], driftPdPa: 1 }];
    s.vasoreactivity.doses = [];
    const i = section(render(s).text, 'INTERPRETATION BY VESSEL')!;
    expect(i).toContain('FFR 0.80: abnormal (cut-off ≤ 0.80, ESC 2024); in the grey zone 0.76–0.80.');
    expect(i).toContain('CFR 3.00: normal');
    expect(i).toContain('IMR 21 U, corrected without wedge pressure: normal (cut-off ≥ 25 U, ESC 2024; EAPCI 2020); uncorrected 22 U.');
    expect(i).toContain('RRR 3.96: normal');
    expect(i).toContain('MRR 4.17: normal');
  });

  it('acetylcholine protocol: each dose with what happened, the result and the reversal', () => {
    const a = section(render(spasm).text, 'ACETYLCHOLINE TESTING')!;
    // Doses 2, 20, 100 µg into the left coronary (ESC 2024 protocol); spasm ≥ 90% with symptoms and ECG (COVADIS).
    expect(a).toContain('Intracoronary acetylcholine into the LAD, 3 doses of 2, 20 and 100 µg, each followed by angiography.');
    expect(a).toMatch(/^Dose\s+Into\s+Diameter reduction\s+Usual symptoms\s+Ischaemic ECG\s+Response\s+Notes$/m);
    expect(a).toMatch(/^2 µg\s+LAD\s+0 %\s+No\s+No\s+Negative\s+HR 58 bpm, BP 124\/72 mmHg, sinus rhythm$/m);
    expect(a).toMatch(/^100 µg\s+LAD\s+95 %\s+Yes\s+Yes\s+Epicardial spasm\s+constriction in LAD, Mid LAD, diffuse/m);
    expect(a).toContain('Result: epicardial spasm. Spasm is judged as constriction of 90% or more with the usual symptoms and ischaemic ECG changes (COVADIS; ESC 2024).');
    expect(a).toContain('Spasm reversed with intracoronary nitroglycerin 200 µg.');
  });

  it('acetylcholine: a dose still missing observations keeps its row, with no response', () => {
    const s = demoReportStudies()[3];
    s.vasoreactivity.doses[2].symptoms = null;
    const a = section(render(s).text, 'ACETYLCHOLINE TESTING')!;
    expect(a).toMatch(/^100 µg\s+LAD\s+95 %\s+—\s+Yes\s+—\s+constriction in LAD/m);
    expect(a).toMatch(/^20 µg\s+LAD\s+15 %\s+No\s+No\s+Negative\s+HR 57 bpm/m);
  });

  it('endotype with its reasons (coronary function studies)', () => {
    const d = section(render(structural).text, 'DIAGNOSIS: CORONARY FUNCTION')!;
    expect(d.split('\n')[0]).toBe('Microvascular angina');
    expect(d).toContain('Reasons:');
    expect(d).toMatch(/- LAD: CFR 1\.\d\d/);
    expect(section(render(normal).text, 'DIAGNOSIS: CORONARY FUNCTION')!.split('\n')[0]).toBe('No coronary abnormality found');
    // The headline is left out when it only repeats the label.
    expect(section(render(normal).text, 'DIAGNOSIS: CORONARY FUNCTION')).not.toContain('No coronary abnormality found.\n');
  });

  it('"angina" in the diagnosis only when the record says angina — COVADIS microvascular angina criteria (Ong et al., Int J Cardiol 2018;250:16-20)', () => {
    for (const anginaPresent of [false, null]) {
      const s = demoReportStudies()[2];
      s.details.anginaPresent = anginaPresent;
      const d = section(render(s).text, 'DIAGNOSIS: CORONARY FUNCTION')!;
      expect(d.split('\n')[0]).toBe('Coronary microvascular dysfunction');
      // Label and headline (the lines before the reasons) do not say angina; the reason says why.
      expect(d.slice(0, d.indexOf('Reasons:'))).not.toMatch(/angina/i);
      expect(d).toContain('named microvascular angina only in a patient with angina');
    }
  });

  it('an equivocal acetylcholine test is printed beside the microvascular finding — COVADIS (Beltrame et al., EHJ 2017)', () => {
    const s = demoReportStudies()[2];
    s.vasoreactivity.doses = s.vasoreactivity.doses.slice(0, 1).map((d) => ({ ...d, micrograms: 100, constrictionPct: 95, symptoms: true, ischemicEcg: false }));
    const d = section(render(s).text, 'DIAGNOSIS: CORONARY FUNCTION')!;
    expect(d.split('\n')[0]).toBe('Microvascular angina');
    expect(d).toContain('equivocal acetylcholine test (criteria for spasm only partly met)');
  });

  it('measurement quality lists the core warnings', () => {
    const q = section(render(functional).text, 'MEASUREMENT QUALITY')!;
    expect(q).toContain('LCx: Pd/Pa at the guide tip after pull-back was 1.03, outside 0.98–1.02');
    expect(section(render(lad).text, 'MEASUREMENT QUALITY')).toBeNull();
  });

  it('complications: free text, the list of kinds, "none" and "not recorded"', () => {
    expect(section(render(spasm).text, 'COMPLICATIONS')).toContain('provoked chest pain and anterior ST elevation were relieved by intracoronary nitroglycerin');
    const s = demoReportStudies()[0];
    const f = s.findings as typeof s.findings & { complicationKinds?: string[] };
    f.complicationKinds = ['none'];
    f.complications = null;
    expect(section(render(s).text, 'COMPLICATIONS')!.trim()).toBe('None.');
    f.complications = 'None.';
    expect(section(render(s).text, 'COMPLICATIONS')!.trim()).toBe('None.');
    f.complications = 'Radial artery spasm at the end, settled with verapamil.';
    expect(section(render(s).text, 'COMPLICATIONS')!.trim()).toBe('None.\nRadial artery spasm at the end, settled with verapamil.');
    f.complicationKinds = ['dissection', 'arrhythmia'];
    f.complications = 'Type A dissection of the mid LAD, no flow limitation.';
    const c = section(render(s).text, 'COMPLICATIONS')!;
    // Labels from the shared complication table once it exists; the codes in words before that.
    expect(c).toMatch(/^(Coronary dissection and arrhythmia needing treatment|Dissection and arrhythmia)\.$/m);
    expect(c).toContain('Type A dissection of the mid LAD, no flow limitation.');
    f.complicationKinds = ['dissection', 'other'];
    f.complications = 'Vasovagal reaction.';
    expect(section(render(s).text, 'COMPLICATIONS')!.trim()).toMatch(/^(Coronary dissection|Dissection)\.\nVasovagal reaction\.$/);
    f.complicationKinds = ['other'];
    expect(section(render(s).text, 'COMPLICATIONS')!.trim()).toBe('Vasovagal reaction.');
    f.complicationKinds = [];
    f.complications = null;
    expect(section(render(s).text, 'COMPLICATIONS')!.trim()).toBe('Not recorded.');
  });

  it('impression and plan keep the physician’s paragraphs', () => {
    const s = demoReportStudies()[0];
    s.findings.impression = 'First paragraph,\nwrapped line.\n\nSecond paragraph.';
    const { text, html } = render(s);
    expect(section(text, 'IMPRESSION')!.trim()).toBe('First paragraph, wrapped line.\nSecond paragraph.');
    expect(html).toContain('<p>First paragraph, wrapped line.</p>\n<p>Second paragraph.</p>');
    expect(section(text, 'RECOMMENDATIONS AND PLAN')).toContain('Dual antiplatelet therapy for 6 months');
  });

  it('thresholds applied, caution, and the signature block', () => {
    const signed = render(lad, {
      signature: { signedBy: 'Dr. Kofi Oduya', signedAt: '2026-11-30T10:15:00Z', reportVersion: 2, fingerprint: '0123456789abcdef'.repeat(4), amendmentReason: 'Access site corrected' },
    });
    expect(section(signed.text, 'THRESHOLDS APPLIED')).toContain('- FFR abnormal: ≤ 0.80 (ESC 2024)');
    expect(signed.text).toContain('Decision support only.');
    expect(signed.text).toContain('Electronically signed by Dr. Kofi Oduya on 30 Nov 2026, 10:15 UTC. Report version 2. Content fingerprint 0123-4567-89ab-cdef.');
    expect(signed.text).toContain('Addendum: Access site corrected');
    expect(render(lad).text).toContain('Preview: not signed.');
    expect(render(lad, { timeZone: 'Europe/Oslo', signature: { signedBy: 'X', signedAt: '2026-11-30T10:15:00Z', reportVersion: 1, fingerprint: 'ab'.repeat(32) } }).text).toContain(
      'on 30 Nov 2026, 11:15 CET.',
    );
  });
});

describe('a plain pressure-wire study of an intermediate lesion', () => {
  for (const i of [0, 1]) {
    const s = demoReportStudies()[i];
    it(`${s.accession} speaks of the lesion and the decision, prints no endotype`, () => {
      const analysis = analysisOf(s);
      const { text, html } = render(s);
      expect(text).toContain('Coronary physiology report');
      expect(section(text, 'CONCLUSION')).toMatch(/haemodynamically significant \(FFR 0\.\d\d\); (treat|defer)/);
      for (const absent of ['endotype', 'Endotype', 'microvascular', 'Microvascular', 'CORONARY FUNCTION', 'ACETYLCHOLINE', 'CFR', 'IMR', 'Not enough data']) {
        expect(text, absent).not.toContain(absent);
      }
      expect(html).not.toContain('class="endotype"');
      // The core's endotype exists (it is not printed here).
      expect(analysis.endotype).toBeTypeOf('string');
    });
  }

  it('the deferred lesion, whose core endotype is inconclusive, reads as a lesion report', () => {
    const s = demoReportStudies()[1];
    expect(analysisOf(s).endotype).toBe('inconclusive');
    const c = section(render(s).text, 'CONCLUSION')!;
    expect(c).toContain('Right coronary (Mid RCA): not haemodynamically significant (FFR 0.86); defer.');
  });

  it('after intervention it speaks of the residual gradient, not of a lesion to judge', () => {
    const s = demoReportStudies()[0];
    s.details.clinicalQuestion = 'post-pci';
    s.vessels[0] = { ...s.vessels[0], hyperemiaPa: 90, hyperemiaPd: 83, consoleFfr: null, nhprKind: null, nhprValue: null, decision: null };
    const { text } = render(s);
    // FFR 83/90 = 0.92 > 0.80 (ESC 2024): no significant residual gradient.
    expect(section(text, 'INTERPRETATION BY VESSEL')).toContain('No haemodynamically significant gradient remains after intervention (judged by FFR).');
    expect(section(text, 'CONCLUSION')!.trim()).toBe('Left anterior descending (Proximal LAD): no significant gradient remains after intervention (FFR 0.92).');
    expect(text).not.toContain('The lesion is');
  });

  it('a minimal record leaves no empty sentence, row or column', () => {
    const s = demoReportStudies()[0];
    s.setup = emptySetup();
    s.details = { ...s.details, accessSite: null, guideFrench: null, encounter: null, referringName: null, procedureStartedAt: null, procedureEndedAt: null };
    s.vessels = [{ ...emptyVessel(s.vessels[0].id, 'LAD'), consoleFfr: 0.83, driftPdPa: 1 }];
    s.findings = { ...s.findings, contrastMl: null, fluoroscopyMinutes: null, airKermaMGy: null, doseAreaProductGyCm2: null };
    const { text, html } = render(s);
    expect(section(text, 'PROCEDURE AND TECHNIQUE')!.trim()).toBe('Drift check, Pd/Pa with the sensor back at the guide tip: LAD 1.00 (within 0.98–1.02).');
    expect(section(text, 'MEASUREMENTS')).toBeNull();
    expect(section(text, 'CALCULATED INDICES')!.trim().split('\n')).toEqual(['Vessel  FFR', '------  ----', 'LAD     0.83']);
    expect(text).not.toMatch(/Encounter|Procedure:|Referring|Heparin|Hyperaemia|Totals/);
    expectNoHoles(text, html);
  });

  it('every demo report is free of empty sentences and cells', () => {
    for (const s of demoReportStudies()) {
      const { text, html } = render(s);
      expectNoHoles(text, html);
    }
  });
});

describe('free text is escaped, never rendered as markup', () => {
  const markup = '<script>alert("x")</script><b onclick=steal()>bold</b> & <img src=x onerror=alert(1)>';

  it('in the impression, plan, indication, complications and patient name', () => {
    const s = demoReportStudies()[0];
    s.findings.impression = markup;
    s.findings.plan = markup;
    s.findings.complications = markup;
    s.details.indication = markup;
    s.patient.givenName = '<i>Harold</i>';
    const { html, text } = render(s);
    expect(html).not.toMatch(/<script|<b |<img|<i>/);
    expect(html).toContain('&lt;script&gt;alert(&quot;x&quot;)&lt;/script&gt;&lt;b onclick&#x3D;steal()&gt;bold&lt;/b&gt; &amp; &lt;img src&#x3D;x onerror&#x3D;alert(1)&gt;');
    expect(html).toContain('QUENNEVILLE, &lt;i&gt;Harold&lt;/i&gt;');
    // The plain text is not markup: it keeps the physician's characters as typed.
    expect(section(text, 'IMPRESSION')!.trim()).toBe(markup);
    expect(text).not.toContain('&lt;');
  });

  it('a 10,000-character impression: the record refuses it, the renderer would print it whole', () => {
    const long = `${'Lorem ipsum dolor sit amet <consectetur> & adipiscing. '.repeat(182)}end`.slice(0, 10_000);
    expect(long).toHaveLength(10_000);
    // The study record caps the impression at 5000 characters with a clear message.
    const parsed = findingsSchema.safeParse({ ...demoReportStudies()[0].findings, impression: long });
    expect(parsed.success).toBe(false);
    expect(parsed.error!.issues[0].message).toBe('Impression is too long (at most 5000 characters).');
    const s = demoReportStudies()[0];
    s.findings.impression = long;
    const { text, html } = render(s);
    expect(section(text, 'IMPRESSION')!.trim()).toBe(long.trim());
    expect(html.split('&lt;consectetur&gt;').length - 1).toBe(long.split('<consectetur>').length - 1);
    expect(html).not.toContain('<consectetur>');
  });
});

describe('what a visual estimate and endothelial dysfunction are called', () => {
  it('a lesion judged only by visual stenosis is "angiographically obstructive", never "haemodynamically significant" — COVADIS (Ong et al., Int J Cardiol 2018): ≥ 50% is angiographic obstruction', () => {
    const s = demoReportStudies()[0];
    s.vessels = [{ ...emptyVessel(s.vessels[0].id, 'LAD'), visualStenosisPct: 60, driftNotDoneReason: 'No wire used' }];
    const text = render(s).text;
    expect(text).toContain('angiographically obstructive by visual estimate');
    expect(text).not.toContain('The lesion is haemodynamically significant');
  });

  it('endothelial dysfunction alone is named in the diagnosis line, not "No coronary abnormality found" — EAPCI 2020; COVADIS', () => {
    const s = demoReportStudies()[5];
    s.vessels = s.vessels.slice(0, 1).map((v) => ({ ...v, restTransit: [0.9, 0.9, 0.9], hyperemiaTransit: [0.25, 0.25, 0.25] }));
    const text = render(s).text;
    expect(text).toContain('endothelial dysfunction');
    expect(text).not.toContain('No coronary abnormality found');
  });
});

describe('CFR, IMR, RRR and MRR in an obstructed vessel are said not to be used for the microvascular finding — COVADIS (Ong et al., Int J Cardiol 2018); EAPCI 2020 INOCA consensus', () => {
  // LAD Pa/Pd rest 100/97, hyperaemia 100/75, Tmn 0.60 / 0.40 s, hand-computed: FFR 0.75 (≤ 0.80, ESC 2024: obstructive),
  // CFR 1.50, RRR 1.5 × 97 / 75 = 1.94 (Lee et al., JAHA 2020), MRR (1.5 / 0.75) × 1 = 2.00 (De Bruyne et al. 2021).
  const obstructed = () => {
    const s = demoReportStudies()[2];
    s.vessels = [{ ...emptyVessel(s.vessels[0].id, 'LAD'), restPa: 100, restPd: 97, hyperemiaPa: 100, hyperemiaPd: 75, restTransit: [0.6, 0.6, 0.6], hyperemiaTransit: [0.4, 0.4, 0.4], driftPdPa: 1 }];
    return s;
  };
  it('template v3: each of those sentences carries the qualifier; the reasons carry it in every version', () => {
    const text = render(obstructed(), { templateVersion: 'v3' }).text;
    const i = section(text, 'INTERPRETATION BY VESSEL')!;
    const q = ' Not used for the microvascular finding: the vessel has an obstructive stenosis.';
    expect(i).toContain(`RRR 1.94: abnormal (cut-off < 2.00, cut-off source not confirmed).${q}`);
    expect(i).toMatch(new RegExp(`MRR 2\\.00: abnormal .*thermodilution\\.${q.replace(/[.:]/g, (c) => `\\${c}`)}`));
    expect(i).toContain(`CFR 1.50: abnormal (cut-off < 2.00, EAPCI 2020).${q}`);
    const d = section(text, 'DIAGNOSIS: CORONARY FUNCTION')!;
    expect(d).toContain('- LAD: RRR 1.94 is below the 2.00 cut-off (cut-off source not confirmed) — reduced resistive reserve — in a vessel with an obstructive stenosis, so not used for the microvascular finding.');
  });
  it('template v1 keeps its interpretation wording, and its reasons still say it', () => {
    const text = render(obstructed(), { templateVersion: 'v1' }).text;
    const i = section(text, 'INTERPRETATION BY VESSEL')!;
    expect(i).toContain('RRR 1.94: abnormal (cut-off < 2.00, cut-off source not confirmed).');
    expect(i).not.toContain('Not used for the microvascular finding');
    expect(section(text, 'DIAGNOSIS: CORONARY FUNCTION')).toContain('reduced resistive reserve — in a vessel with an obstructive stenosis, so not used for the microvascular finding.');
  });
  it('a non-obstructed vessel gets no qualifier', () => {
    const s = obstructed();
    s.vessels[0].hyperemiaPd = 90;
    const i = section(render(s, { templateVersion: 'v3' }).text, 'INTERPRETATION BY VESSEL')!;
    expect(i).toContain('RRR ');
    expect(i).not.toContain('Not used for the microvascular finding');
  });
});

describe('microvascular dysfunction of a type not known is worded as such in the report — EAPCI 2020 INOCA consensus (structural = low CFR with IMR ≥ 25; functional = low CFR with normal IMR)', () => {
  it('raised IMR with CFR not measured: no "preserved CFR", the reason says CFR was not measured', () => {
    // LAD FFR 90/100 = 0.90, hyperaemic Tmn 0.40 s → IMR 36 U (≥ 25, EAPCI 2020); no resting Tmn, so no CFR.
    const s = demoReportStudies()[2];
    s.details.anginaPresent = true;
    s.vessels = [{ ...emptyVessel(s.vessels[0].id, 'LAD'), hyperemiaPa: 100, hyperemiaPd: 90, hyperemiaTransit: [0.4, 0.4, 0.4], driftPdPa: 1 }];
    const text = render(s).text;
    const d = section(text, 'DIAGNOSIS: CORONARY FUNCTION')!;
    expect(d).toContain('Microvascular angina: coronary microvascular dysfunction with raised IMR (CFR not measured, so its type is not known) in LAD.');
    expect(d).toContain('CFR was not measured, so its type cannot be decided');
    expect(text).not.toMatch(/preserved/i);
  });
});

describe('entered percentages are printed on the side of the cut-off they were judged on — COVADIS (Ong et al., Int J Cardiol 2018: ≥ 50% visual stenosis is obstructive; ≥ 90% constriction with symptoms and ECG changes is epicardial spasm)', () => {
  it('a 49.6% visual stenosis, not obstructive, prints 49.6 %, never 50 %', () => {
    const s = demoReportStudies()[0];
    s.vessels = [{ ...emptyVessel(s.vessels[0].id, 'LAD'), visualStenosisPct: 49.6, driftNotDoneReason: 'No wire used' }];
    const text = render(s).text;
    expect(text).toContain('not angiographically obstructive by visual estimate (visual stenosis 49.6 %');
    expect(text).not.toContain('50 %');
  });
  it('an 89.6% constriction with symptoms and ECG changes (microvascular spasm) prints 89.6 % in the dose table', () => {
    const s = demoReportStudies()[3];
    const last = s.vasoreactivity.doses.length - 1;
    s.vasoreactivity.doses[last] = { ...s.vasoreactivity.doses[last], constrictionPct: 89.6, symptoms: true, ischemicEcg: true };
    const a = section(render(s).text, 'ACETYLCHOLINE TESTING')!;
    expect(a).toMatch(/89\.6 %\s+Yes\s+Yes\s+Microvascular spasm/);
  });
});

describe('an addendum (template v4) says it is one', () => {
  const s = demoReportStudies()[0];
  const before = structuredClone(s) as unknown as Record<string, unknown>;
  const after = structuredClone(s);
  after.details.accessSite = after.details.accessSite === 'right-femoral' ? 'right-radial' : 'right-femoral';
  const amends = { versionNo: 1, signedAt: '2026-11-30T10:15:00Z', signedBy: 'Dr. Kofi Oduya', fingerprint: 'ab'.repeat(32), record: before };
  const signature = { signedBy: 'Dr. Kofi Oduya', signedAt: '2026-11-30T12:00:00Z', reportVersion: 2, fingerprint: 'cd'.repeat(32), amendmentReason: 'Access site entered in error.' };

  it('names the version it supersedes, the reason and each change, before the indication', () => {
    const { text, html } = render(after, { templateVersion: 'v4', amends, signature });
    expect(text).toContain('AMENDED REPORT — version 2');
    expect(text).toContain('Supersedes version 1, signed 30 Nov 2026, 10:15 UTC by Dr. Kofi Oduya (fingerprint abab-abab-abab-abab).');
    expect(text).toContain('Reason: Access site entered in error.');
    expect(text).toMatch(/- Procedure › Access site: right (radial|femoral), changed to right (femoral|radial)/);
    expect(text.indexOf('AMENDED REPORT')).toBeLessThan(text.indexOf('INDICATION'));
    expect(html).toContain('<h2>Amended report — version 2</h2>');
  });

  it('a first version, and templates before v4, print no such block', () => {
    expect(render(after, { templateVersion: 'v4', signature: { ...signature, reportVersion: 1, amendmentReason: null } }).text).not.toContain('AMENDED REPORT');
    expect(render(after, { templateVersion: 'v3', amends, signature }).text).not.toContain('AMENDED REPORT');
  });
});
