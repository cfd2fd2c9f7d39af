import { describe, expect, it } from 'vitest';
import { defaultThresholds, type Thresholds } from '../../../shared/physiology/thresholds';
import { isTimeZone, labSettingsFormSchema } from '../../../shared/settings/lab-settings';
import { thresholdKeys, thresholdRanges, thresholdRelationProblems, thresholdSetRequestSchema, thresholdSourceOf } from '../../../shared/settings/threshold-ranges';
import { renderNarrative } from '../../../server/report-document';
import { demoReportStudies, viewOf } from '../report/fixtures';
import { thresholdsBasisSentence } from '../../../server/report-document/view-model';
import { listTemplateVersions, readTemplateVersion } from '../../../server/report-document/template-versions';

const pointers = (r: { success: boolean; error?: { issues: { path: PropertyKey[] }[] } }) => (r.error?.issues ?? []).map((i) => '/' + i.path.join('/'));

describe('threshold ranges', () => {
  it('holds every published default inside its own range, on its step', () => {
    for (const k of thresholdKeys) {
      const r = thresholdRanges[k];
      expect(defaultThresholds[k], k).toBeGreaterThanOrEqual(r.min);
      expect(defaultThresholds[k], k).toBeLessThanOrEqual(r.max);
      expect(thresholdSetRequestSchema.safeParse({ values: { [k]: defaultThresholds[k] } }).success, k).toBe(true);
    }
  });

  it.each([
    // CFR: EAPCI 2020 uses 2.0 for thermodilution, ESC 2024 < 2.5; COVADIS ≤ 2.0–2.5.
    [{ cfr: 2.0 }, true],
    [{ cfr: 2.5 }, true],
    [{ cfr: 2.25 }, true],
    [{ cfr: 1.99 }, false],
    [{ cfr: 2.51 }, false],
    [{ cfr: 2.251 }, false],
    // FFR: DEFER 0.75, FAME 0.80.
    [{ ffr: 0.75 }, true],
    [{ ffr: 0.74 }, false],
    // IMR 25 (ESC 2024); 40 after STEMI; bounds 20–40 common practice.
    [{ imr: 40 }, true],
    [{ imr: 24.5 }, false],
    [{ cfr: Number.NaN }, false],
  ])('%j is accepted: %s', (values, ok) => {
    const r = thresholdSetRequestSchema.safeParse({ values });
    expect(r.success).toBe(ok);
    if (!ok) expect(pointers(r)[0]).toBe(`/values/${Object.keys(values)[0]}`);
  });

  it('names the cut-off and its range in the message', () => {
    const r = thresholdSetRequestSchema.safeParse({ values: { cfr: 3 } });
    expect(r.error?.issues[0].message).toBe('CFR cut-off must be between 2.00 and 2.50 (ratio) (EAPCI 2020 (2.0 for thermodilution); COVADIS ≤ 2.0–2.5; ESC 2024 (< 2.5)).');
  });

  it('checks the cut-offs that belong together (common practice)', () => {
    const t: Thresholds = { ...defaultThresholds, ffr: 0.77, ffrGreyZoneLow: 0.78, mrr: 2.8, mrrBorderline: 2.7 };
    expect(thresholdRelationProblems(t).map((p) => p.key).sort()).toEqual(['ffrGreyZoneLow', 'mrrBorderline']);
    expect(thresholdRelationProblems(defaultThresholds)).toEqual([]);
    // DEFER's 0.75 cut-off lies below the default grey zone 0.76–0.80 (DEFER/FAME history, Interv Cardiol Rev 2016):
    // the lab is told to lower the grey zone with it.
    expect(thresholdRelationProblems({ ...defaultThresholds, ffr: 0.75 }).map((p) => p.key)).toEqual(['ffrGreyZoneLow']);
    expect(thresholdRelationProblems({ ...defaultThresholds, ffr: 0.75, ffrGreyZoneLow: 0.75 })).toEqual([]);
  });

  it('calls a value other than the published default a lab setting', () => {
    expect(thresholdSourceOf('cfr', 2.0)).toMatchObject({ published: true });
    expect(thresholdSourceOf('cfr', 2.5)).toEqual({ source: 'lab setting', published: false });
  });
});

describe('lab settings schema', () => {
  it('knows IANA time zones through Intl', () => {
    expect(isTimeZone('Europe/Oslo')).toBe(true);
    expect(isTimeZone('America/Argentina/Buenos_Aires')).toBe(true);
    expect(isTimeZone('UTC')).toBe(true);
    expect(isTimeZone('Mars/Olympus')).toBe(false);
    expect(isTimeZone('')).toBe(false);
  });

  const ok = { timeZone: 'Europe/Oslo', signatureTargetHours: 24, ehrBaseUrl: null, mailFrom: null };
  it.each([
    [{}, []],
    [{ signatureTargetHours: 0.5 }, ['/signatureTargetHours']],
    [{ signatureTargetHours: 12.25 }, ['/signatureTargetHours']],
    [{ ehrBaseUrl: 'https://ehr.hospital.example/fhir' }, []],
    [{ ehrBaseUrl: 'https://user:pw@ehr.hospital.example/fhir' }, ['/ehrBaseUrl']],
    [{ ehrBaseUrl: 'javascript:alert(1)' }, ['/ehrBaseUrl']],
    [{ mailFrom: 'Cath lab <cathlab@hospital.example>' }, []],
    [{ mailFrom: 'cathlab@hospital.example' }, []],
    [{ mailFrom: 'Cath lab <cathlab@hospital.example' }, ['/mailFrom']],
    [{ mailFrom: 'nobody' }, ['/mailFrom']],
    // RFC 5322 §3.4: a comma separates mailboxes — one sender only, so none in the name.
    [{ mailFrom: 'evil@attacker.example, Lab <isobar@h.example>' }, ['/mailFrom']],
    [{ mailFrom: 'Lab; x <isobar@h.example>' }, ['/mailFrom']],
    // RFC 5322 §3.4: "display-name:" opens a group of addresses — none in a sender's name.
    [{ mailFrom: 'Bcc: x@evil.example <isobar@h.example>' }, ['/mailFrom']],
    [{ colour: 'blue' }, ['/']],
  ])('%j → errors at %j', (change, expected) => {
    expect(pointers(labSettingsFormSchema.safeParse({ ...ok, ...change }))).toEqual(expected);
  });
});

describe('report template versions', () => {
  it('lists the shipped versions with their descriptions and reads one', () => {
    const versions = listTemplateVersions();
    expect(versions.map((v) => v.version)).toEqual(expect.arrayContaining(['v1', 'v2']));
    expect(versions.find((v) => v.version === 'v2')?.description).toMatch(/which set judged the report/);
    expect(readTemplateVersion('v2')?.sources.length).toBeGreaterThan(10);
    expect(readTemplateVersion('v99')).toBeNull();
    expect(readTemplateVersion('../v1')).toBeNull();
  });

  it('says which thresholds judged the report, in words', () => {
    expect(thresholdsBasisSentence({ basis: 'in-force', setId: null, effectiveFrom: null, amendedVersion: null }, 'UTC')).toBe('Judged by the published default thresholds.');
    expect(thresholdsBasisSentence({ basis: 'original', setId: 3, effectiveFrom: '2026-03-01T00:00:00Z', amendedVersion: 1 }, 'UTC')).toMatch(/^This addendum keeps the thresholds of report version 1: the lab's thresholds in force from /);
    expect(thresholdsBasisSentence({ basis: 'current', setId: 4, effectiveFrom: '2026-04-01T00:00:00Z', amendedVersion: 2 }, 'UTC')).toMatch(/not those of report version 2/);
  });

  it('prints the sentence under the thresholds from v2 on, never in v1', () => {
    const study = demoReportStudies()[0];
    const basis = { basis: 'in-force' as const, setId: 7, effectiveFrom: '2026-03-01T08:00:00Z', amendedVersion: null };
    const v1 = renderNarrative(viewOf(study, { templateVersion: 'v1', thresholdsBasis: basis }));
    const v2 = renderNarrative(viewOf(study, { templateVersion: 'v2', thresholdsBasis: basis }));
    expect(v1.templateVersion).toBe('v1');
    expect(v1.text).not.toMatch(/Judged by/);
    expect(v2.templateVersion).toBe('v2');
    expect(v2.text).toMatch(/Judged by the lab's thresholds in force from 1 Mar 2026/);
    expect(v2.html).toMatch(/<p class="thresholds-basis">Judged by the lab&#x27;s thresholds in force from/);
  });
});
