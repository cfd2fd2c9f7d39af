import { describe, expect, it } from 'vitest';
import { defaultThresholds } from '../../../shared/physiology';
import { thresholdSources } from '../../../shared/physiology/thresholds';
import { renderReportPdf } from '../../../server/report-document/pdf';
import { hasPoppler, pdfPages } from '../../support/pdf-to-png';
import { reportDocument } from '../../../server/report-document/document';
import { documentStrings } from '../../../shared/report/document';
import { demoReportStudies, render, section, viewOf } from './fixtures';

describe('a negative acetylcholine test that stopped before the last dose says so', () => {
  // Protocol into the left coronary: 2, 20, 100, 200 µg (ESC 2024 chronic coronary syndromes guideline,
  // protocol figure; COVADIS). Into the right coronary: 20, 50 µg (Japanese Circulation Society 2016).
  it('left coronary stopped at 100 µg: "negative up to 100 µg; 200 µg not given (incomplete protocol)"', () => {
    const s = demoReportStudies()[2]; // 2, 20, 100 µg into the LAD, no response
    expect(viewOf(s).acetylcholine!.result).toBe(
      'Result: negative up to 100 µg; 200 µg not given (incomplete protocol). Spasm is judged as constriction of 90% or more with the usual symptoms and ischaemic ECG changes (COVADIS; ESC 2024).',
    );
    expect(section(render(s).text, 'ACETYLCHOLINE TESTING')).toContain('Result: negative up to 100 µg; 200 µg not given (incomplete protocol).');
  });

  it('the reason under the diagnosis says the same', () => {
    const reasons = viewOf(demoReportStudies()[2]).endotype!.reasons;
    expect(reasons).toContain(
      'Acetylcholine testing was negative up to 100 µg (200 µg not given: incomplete protocol): maximum constriction 15% (below 20%, common practice; source not confirmed) and no dose reproduced symptoms or ischaemic ECG changes (COVADIS; ESC 2024).',
    );
  });

  it('the full left protocol up to 200 µg stays plainly "negative"', () => {
    const s = demoReportStudies()[4]; // 2, 20, 100, 200 µg, no response
    expect(viewOf(s).acetylcholine!.result).toMatch(/^Result: negative\. Spasm is judged/);
    expect(viewOf(s).endotype!.reasons.join(' ')).toContain('Acetylcholine testing was negative: maximum constriction 15%');
  });

  it('right coronary stopped at 20 µg: 50 µg not given (Japanese Circulation Society 2016)', () => {
    const s = demoReportStudies()[2];
    s.vasoreactivity.doses = s.vasoreactivity.doses.slice(0, 2).map((d) => ({ ...d, vessel: 'RCA' as const }));
    expect(viewOf(s).acetylcholine!.result).toMatch(/^Result: negative up to 20 µg; 50 µg not given \(incomplete protocol\)\. /);
  });

  it('doses into both coronaries name the artery that fell short', () => {
    const s = demoReportStudies()[4]; // left protocol complete
    const rca = { ...s.vasoreactivity.doses[1], id: '00000000-0000-4000-8000-000000009999', vessel: 'RCA' as const, micrograms: 20 };
    s.vasoreactivity.doses = [...s.vasoreactivity.doses, rca];
    expect(viewOf(s).acetylcholine!.result).toMatch(/^Result: negative into the right coronary up to 20 µg; 50 µg not given \(incomplete protocol\)\. /);
  });

  it('a positive test stopped early is not qualified: the protocol stops at spasm (ESC 2024 protocol figure)', () => {
    const s = demoReportStudies()[3]; // epicardial spasm at 100 µg
    expect(viewOf(s).acetylcholine!.result).toMatch(/^Result: epicardial spasm\. /);
  });
});

describe('the decision line of a vessel without a lesion', () => {
  // "Defer" is said of a lesion whose revascularisation is put off (DEFER/FAME); a vessel with no visible
  // stenosis and no pressure index was assessed for coronary function only (common practice).
  const functionOnly = () => {
    const s = demoReportStudies()[4];
    const v = s.vessels[0];
    Object.assign(v, { visualStenosisPct: 0, restPa: null, restPd: null, hyperemiaPa: null, hyperemiaPd: null, consoleFfr: null, driftPdPa: null, decision: 'defer' });
    return s;
  };

  it('0 % stenosis, no pressure index, "defer" recorded: "No revascularisation indicated."', () => {
    const lines = viewOf(functionOnly()).interpretation[0].sentences;
    expect(lines).toContain('No revascularisation indicated.');
    expect(lines.join(' ')).not.toContain('Decision: defer');
  });

  it('the same vessel with no decision recorded has no decision line', () => {
    const s = functionOnly();
    s.vessels[0].decision = null;
    expect(viewOf(s).interpretation[0].sentences.join(' ')).not.toMatch(/Decision|revascularisation/);
  });

  it('a lesion keeps "Decision: defer." (with FFR 0.86: the deferred mid RCA lesion)', () => {
    const s = demoReportStudies()[1];
    expect(viewOf(s).interpretation[0].sentences).toContain('Decision: defer.');
    expect(viewOf(s).lesionSummary).toContain('Right coronary (Mid RCA): not haemodynamically significant (FFR 0.86); defer.');
  });

  it('a 0 % vessel with a pressure index is judged by it and keeps "Decision: defer."', () => {
    const s = demoReportStudies()[4]; // LAD 0 %, FFR 0.92, "defer"
    expect(viewOf(s).interpretation[0].sentences).toContain('Decision: defer.');
  });

  it('in a lesion report, the conclusion line of a vessel without a lesion reads "no revascularisation indicated"', () => {
    const s = functionOnly();
    s.details.clinicalQuestion = 'intermediate-lesion';
    s.vasoreactivity.doses = [];
    s.vessels[0].restTransit = [];
    s.vessels[0].hyperemiaTransit = [];
    expect(viewOf(s).lesionSummary.join(' ')).toMatch(/not angiographically obstructive by visual estimate, not assessed physiologically \(visual stenosis 0 %\); no revascularisation indicated\./);
  });
});

describe('complications: "none" chosen and free text given (common practice: say it once)', () => {
  const withComplications = (kinds: string[], text: string | null) => {
    const s = demoReportStudies()[0];
    Object.assign(s.findings, { complicationKinds: kinds, complications: text });
    return section(render(s).text, 'COMPLICATIONS')!.trim();
  };

  it('text that opens with "No complication" is printed alone', () => {
    const text = 'No complication. The provoked chest pain and anterior ST elevation were relieved by intracoronary nitroglycerin within 2 minutes.';
    expect(withComplications(['none'], text)).toBe(text);
    expect(viewOf(demoReportStudies()[3]).complications).toEqual([text]);
  });

  it('"No complications." alone is printed alone', () => {
    expect(withComplications(['none'], 'No complications.')).toBe('No complications.');
  });

  it('text that adds something else keeps "None." before it', () => {
    expect(withComplications(['none'], 'Radial compression band applied, removed after 2 hours.')).toBe('None.\nRadial compression band applied, removed after 2 hours.');
  });

  it('"None." chosen with no text, or text "None.", prints "None." once', () => {
    expect(withComplications(['none'], null)).toBe('None.');
    expect(withComplications(['none'], 'none')).toBe('None.');
  });
});

describe('the MRR line states both cut-offs once — de Vos et al., JACC Cardiovasc Interv 2023;16(4):470–481 (PMID 36858668): < 2.1 rules in, > 2.7 rules out', () => {
  // Hand-computed from the formula (De Bruyne et al. 2021), not from a paper: Pa/Pd rest 100/95, hyperaemia
  // 100/90 → FFR 0.90; Tmn rest 0.54 s, hyperaemia 0.25 s → CFR 2.16; MRR = (2.16 / 0.90) × (100 / 100) = 2.40.
  const mrrLine = (extra: Parameters<typeof viewOf>[1] = {}) => {
    const s = demoReportStudies()[4];
    Object.assign(s.vessels[0], { restPa: 100, restPd: 95, hyperemiaPa: 100, hyperemiaPd: 90, consoleFfr: null, restTransit: [0.54, 0.54, 0.54], hyperemiaTransit: [0.25, 0.25, 0.25] });
    return viewOf(s, extra).interpretation[0].sentences.find((x) => x.startsWith('MRR'))!;
  };

  it('"MRR 2.40: borderline (abnormal < 2.10, normal > 2.70; de Vos 2023)"', () => {
    const line = mrrLine();
    expect(line).toBe('MRR 2.40: borderline (abnormal < 2.10, normal > 2.70; de Vos 2023). Computed from bolus thermodilution; these cut-offs were set with continuous thermodilution.');
    expect(line).not.toContain('cut-off <');
  });

  it('the long source of the MRR cut-offs names the journal right', () => {
    expect(thresholdSources.mrr).toContain('de Vos et al., JACC Cardiovasc Interv 2023;16(4):470–481');
    expect(thresholdSources.mrrBorderline).toContain('de Vos et al., JACC Cardiovasc Interv 2023;16(4):470–481');
    expect(JSON.stringify(thresholdSources)).not.toContain('Imaging');
  });
});

describe('a vessel whose drift check failed is marked in the indices table', () => {
  // Pd/Pa at the guide tip after pull-back outside 0.98–1.02 means the pressures drifted (drift > 2 mmHg
  // means repeat: Cook et al., Circ Cardiovasc Interv 2016); the 0.98–1.02 window [memory].
  const functional = () => demoReportStudies()[5]; // LAD drift 0.99, LCx drift 1.03
  const note = '† Drift check outside 0.98–1.02: pressure ratios of this vessel are less reliable.';

  it('view: the LCx row carries "†", the LAD row none, and the table explains the mark', () => {
    const t = viewOf(functional()).indices!;
    expect(t.rows.map((r) => [r[0].text, r[0].mark ?? null])).toEqual([
      ['LAD', null],
      ['LCx', '†'],
    ]);
    expect(t.footnotes).toEqual([note]);
  });

  it('the window in the note is the one in force (lab setting 0.97–1.03)', () => {
    const s = functional();
    const lab = { ...defaultThresholds, driftLow: 0.97, driftHigh: 1.03 };
    s.vessels[1].driftPdPa = 1.04;
    expect(viewOf(s, { thresholds: lab }).indices!.footnotes).toEqual(['† Drift check outside 0.97–1.03: pressure ratios of this vessel are less reliable.']);
    s.vessels[1].driftPdPa = 1.03; // inside the lab's window: no mark
    expect(viewOf(s, { thresholds: lab }).indices!.footnotes).toBeUndefined();
    expect(viewOf(s, { thresholds: lab }).indices!.rows.some((r) => r[0].mark)).toBe(false);
  });

  it('narrative from template v4: marked row and the note under the table, in the text and the HTML', () => {
    const n = render(functional(), { templateVersion: 'v4' });
    const indices = section(n.text, 'CALCULATED INDICES')!;
    expect(indices).toMatch(/^LCx †\s+0\.92\s/m);
    expect(indices).toMatch(/^LAD\s+0\.90\s/m);
    expect(indices.split('\n').filter((l) => l.includes('†'))).toHaveLength(2); // the LCx row and the note
    expect(indices).toContain(note);
    expect(n.html).toContain('<th scope="row">LCx <sup class="mark">†</sup></th>');
    expect(n.html).toContain(`<p class="table-note">${note}</p>`);
  });

  it('the live preview (structured document) from template v4 shows the same mark and note; v3 neither', () => {
    const v4 = reportDocument(viewOf(functional(), { templateVersion: 'v4' }));
    const strings = documentStrings(v4);
    expect(strings).toContain('LCx †');
    expect(strings).toContain(note);
    const text = render(functional(), { templateVersion: 'v4' }).text;
    for (const x of strings.filter((x) => x.includes('†'))) expect(text).toContain(x);
    expect(documentStrings(reportDocument(viewOf(functional(), { templateVersion: 'v3' }))).join(' ')).not.toContain('†');
  });

  it('narrative of an older template version (v3) is worded as it was signed: no mark, no note', () => {
    const n = render(functional(), { templateVersion: 'v3' });
    expect(n.text).not.toContain('†');
    expect(n.html).not.toContain('†');
  });

  it.skipIf(!hasPoppler('pdftotext'))('PDF: the mark beside LCx and the note under the table', async () => {
    const pdf = await renderReportPdf(viewOf(functional()));
    const text = pdfPages(pdf).join('\n');
    expect(text).toMatch(/LCx\s*†/);
    expect(text.replace(/\s+/g, ' ')).toContain(note);
  });
});

describe('a dose and its unit stay on one line in the dose table (common practice: never split a number from its unit)', () => {
  // The dose cell joins number and unit with a no-break space (U+00A0); Public Sans has the glyph.
  const crowded = () => {
    const view = viewOf(demoReportStudies()[4]);
    // Long notes squeeze the auto-width columns of the dose table to their narrowest.
    for (const d of view.acetylcholine!.doses) d.notes = 'constriction in LAD, Mid LAD, diffuse; HR 66 bpm, BP 120/68 mmHg, sinus rhythm; '.repeat(4);
    return view;
  };

  it('view: "100\u00a0µg" in the dose column (acetylcholine 2, 20, 100, 200 µg: ESC 2024 protocol)', () => {
    expect(viewOf(demoReportStudies()[4]).acetylcholine!.doses.map((d) => d.dose)).toEqual(['2\u00a0µg', '20\u00a0µg', '100\u00a0µg', '200\u00a0µg']);
  });

  it('HTML dose cells hold the no-break space; the plain-text table (which never wraps) keeps a plain space', () => {
    const n = render(demoReportStudies()[4]);
    expect(n.html).toContain('<td>100\u00a0µg</td>');
    expect(section(n.text, 'ACETYLCHOLINE TESTING')).toMatch(/^100 µg\s+LAD/m);
    expect(n.text).not.toContain('\u00a0');
  });

  it.skipIf(!hasPoppler('pdftotext'))('PDF: no "µg" alone on a line of the dose table; with a plain space it would be', async () => {
    const lonelyUnits = async (view: ReturnType<typeof viewOf>) =>
      pdfPages(await renderReportPdf(view))
        .join('\n')
        .split('\n')
        .filter((l) => /^\s*µg\s{2,}\S/.test(l)).length; // "µg" alone in the dose column, the notes beside it
    expect(await lonelyUnits(crowded())).toBe(0);
    const plain = crowded();
    for (const d of plain.acetylcholine!.doses) d.dose = d.dose.replace('\u00a0', ' ');
    expect(await lonelyUnits(plain)).toBeGreaterThan(0);
  });
});

describe('heparin: the weight-based dose beside the total (common practice to report U/kg; EAPCI 2020 gives 50–70 U/kg)', () => {
  const technique = (units: number | null, weightKg: number | null) => {
    const s = demoReportStudies()[4];
    s.setup.heparinUnits = units;
    s.details.weightKg = weightKg;
    return viewOf(s).technique;
  };

  it('4500 U for 58 kg: "Heparin 4500 U (78 U/kg)." (4500 / 58 = 77.6)', () => {
    expect(technique(4500, 58)).toContain('Heparin 4500 U (78 U/kg).');
  });

  it('no weight recorded: the total alone', () => {
    expect(technique(4500, null)).toContain('Heparin 4500 U.');
  });

  it('no judgement of the dose, even outside 50–70 U/kg: 10000 U for 58 kg reads "(172 U/kg)" and nothing more', () => {
    expect(technique(10000, 58)).toContain('Heparin 10000 U (172 U/kg).');
  });

  it('no heparin recorded: no heparin sentence', () => {
    expect(technique(null, 58).join(' ')).not.toContain('Heparin');
  });
});
