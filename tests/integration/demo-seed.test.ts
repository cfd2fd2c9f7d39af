import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { analyzeStudy, type PhysiologyResult } from '../../shared/physiology';
import { studySectionsSchema, type StudyRecord } from '../../shared/study/schema';
import { toPhysiologyInput } from '../../shared/study/to-physiology';
import { defaultSignatureTargetHours, waitingSince } from '../../shared/turnaround/overdue';
import { demoStudies } from '../../server/demo/scenario';
import { seedDemo } from '../../server/demo/seed';
import { loadStudy, patchStudy } from '../../server/studies/repository';
import { openTestDatabase, removeStudiesAsOwner, testConfig } from '../support/app';

// Other files share this database and add their own rows, so counts are compared, never assumed.
const issuer = testConfig().oidc.issuer;
const accessions = demoStudies.map((s) => s.accession);
const now = new Date();
const tables = ['app_user', 'patient', 'study', 'vessel_assessment', 'thermodilution_injection', 'acetylcholine_dose'] as const;

let db: DataSource;
let physicianId: string;
const records = new Map<string, StudyRecord>();
const analyses = new Map<string, PhysiologyResult>();

async function counts(): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const t of tables) out[t] = (await db.query(`SELECT count(*)::int AS n FROM ${t}`))[0].n;
  return out;
}

async function loadDemo(accession: string): Promise<StudyRecord> {
  const [row] = await db.query(`SELECT id FROM study WHERE accession = $1`, [accession]);
  const record = await loadStudy(db, row.id);
  if (!record) throw new Error(`demo study ${accession} not found`);
  return record;
}

beforeAll(async () => {
  db = await openTestDatabase();
  // Start from no demo studies (a database kept between runs may hold them), then seed twice.
  await removeStudiesAsOwner(`accession = ANY($1)`, [accessions]);
  await seedDemo(db, issuer, now);
  for (const a of accessions) {
    const record = await loadDemo(a);
    records.set(a, record);
    analyses.set(a, analyzeStudy(toPhysiologyInput(record)));
  }
  [{ id: physicianId }] = await db.query(`SELECT id FROM app_user WHERE issuer = $1 AND subject = 'demo-physician'`, [issuer]);
});
afterAll(async () => {
  await db.destroy();
});

describe('the demo reaches its states through the real hand-off and signing code', () => {
  it('signed studies have one signed version with a PDF; the amended one has two, the second superseding the first', async () => {
    const versions = async (accession: string) =>
      db.query(
        `SELECT v.version_no, v.status, v.supersedes_id IS NOT NULL AS supersedes, (SELECT length(f.pdf) > 1000 FROM report_pdf f WHERE f.report_version_id = v.id) AS has_pdf, v.reason
         FROM report_version v JOIN study s ON s.id = v.study_id WHERE s.accession = $1 ORDER BY v.version_no`,
        [accession],
      );
    expect(await versions('SBR-26-0411')).toEqual([{ version_no: 1, status: 'final', supersedes: false, has_pdf: true, reason: null }]);
    expect(await versions('SBR-26-0413')).toEqual([]);
    const amended = await versions('SBR-26-0415');
    expect(amended.map((v: { status: string }) => v.status)).toEqual(['final', 'amended']);
    expect(amended[1].supersedes).toBe(true);
    expect(records.get('SBR-26-0415')!.details.accessSite).toBe('right-femoral');
    expect(records.get('SBR-26-0415')!.state).toBe('amended');
  });
});

describe('seeding the demo is idempotent', () => {
  it('a second run adds no rows and changes no study', async () => {
    const before = await counts();
    await seedDemo(db, issuer, new Date(now.getTime() + 3_600_000));
    expect(await counts()).toEqual(before);
    for (const a of accessions) {
      const again = await loadDemo(a);
      expect(again.version).toBe(records.get(a)!.version);
      expect(again.details.procedureEndedAt).toBe(records.get(a)!.details.procedureEndedAt);
      expect(again.vessels.map((v) => v.id)).toEqual(records.get(a)!.vessels.map((v) => v.id));
    }
  });

  it('leaves a demo study edited in the demo alone', async () => {
    // The draft case: signed and amended studies refuse edits.
    const record = await loadDemo('SBR-26-0414');
    const impression = 'Edited during the demo.';
    await patchStudy(db, record.id, { version: record.version, findings: { ...record.findings, impression }, vessels: [] });
    const before = await counts();
    await seedDemo(db, issuer, now);
    expect(await counts()).toEqual(before);
    const after = await loadDemo('SBR-26-0414');
    expect(after.findings.impression).toBe(impression);
    expect(after.vessels).toEqual([]);
    expect(after.version).toBe(record.version + 1);
    // Put the seeded study back for later files; the checks below use the records read in beforeAll.
    await db.query(`DELETE FROM study WHERE id = $1`, [record.id]);
    await seedDemo(db, issuer, now);
    const restored = await loadDemo('SBR-26-0414');
    expect(restored.vessels).toHaveLength(1);
    expect(analyzeStudy(toPhysiologyInput(restored)).endotype).toBe('vasospastic-angina');
  });
});

describe('every demo study carries a full structured record', () => {
  it.each(accessions)('%s', (accession) => {
    const r = records.get(accession)!;
    // Stored values are still valid against the shared schemas (the form's and the API's limits).
    expect(() => studySectionsSchema.parse(r)).not.toThrow();
    expect(r.details).toMatchObject({ operatorId: physicianId, guideFrench: 6 });
    expect(r.details.referringName).toMatch(/^Dr\. /);
    expect(r.details.referringEmail).toMatch(/@saltmarsh\.example$/);
    for (const v of Object.values(r.details)) expect(v).not.toBeNull();
    for (const v of Object.values(r.setup)) expect(v).not.toBeNull();
    // Complications are recorded explicitly ("none" included); details are written only when there is something to say.
    expect(r.findings.complicationKinds.length).toBeGreaterThan(0);
    for (const [k, v] of Object.entries(r.findings)) if (k !== 'complications') expect(v, k).not.toBeNull();
    // Three injections per thermodilution set (from memory: three at rest, three at hyperaemia).
    for (const v of r.vessels) {
      expect([0, 3]).toContain(v.restTransit.length);
      expect(v.hyperemiaTransit.length).toBe(v.restTransit.length);
      expect(v.restPa !== null && v.restPd !== null && v.hyperemiaPa !== null && v.hyperemiaPd !== null).toBe(true);
    }
  });
});

describe('the demo studies come out of the physiology core as intended', () => {
  const vesselResult = (accession: string, code: string) => analyses.get(accession)!.vessels.find((v) => v.vessel === code)!;

  it('SBR-26-0411: intermediate proximal LAD lesion, low FFR, treated', () => {
    const r = records.get('SBR-26-0411')!;
    const lad = vesselResult('SBR-26-0411', 'LAD');
    expect(r.state).toBe('signed');
    // FFR = Pd/Pa at hyperaemia, 63/88 (hand-computed); FFR ≤ 0.80 abnormal — ESC 2024.
    expect(lad.ffr).toBeCloseTo(0.72, 2);
    expect(lad.ffrFlag).toBe('abnormal');
    // Below the grey zone 0.76–0.80 — DEFER/FAME history.
    expect(lad.ffrGreyZone).toBeUndefined();
    // Abnormal FFR means obstructive, which takes precedence — EAPCI 2020.
    expect(analyses.get('SBR-26-0411')!.endotype).toBe('obstructive');
    expect(analyses.get('SBR-26-0411')!.findings.obstructive).toBe(true);
    expect(r.vessels[0]).toMatchObject({ segment: '6', decision: 'pci' });
  });

  it('SBR-26-0412: moderate mid RCA lesion, normal FFR, deferred', () => {
    const r = records.get('SBR-26-0412')!;
    const rca = vesselResult('SBR-26-0412', 'RCA');
    expect(r.state).toBe('signed');
    // FFR 74/86 = 0.86 (hand-computed), above the 0.80 cut-off — ESC 2024.
    expect(rca.ffr).toBeCloseTo(0.86, 2);
    expect(rca.ffrFlag).toBe('normal');
    // Pressures only: no microvascular index and no acetylcholine, so the core calls it inconclusive.
    expect(analyses.get('SBR-26-0412')!.findings).toEqual({ obstructive: false, microvascular: null, microvascularDysfunction: false, endothelialDysfunction: false, vasospasm: null });
    expect(analyses.get('SBR-26-0412')!.endotype).toBe('inconclusive');
    expect(r.vessels[0]).toMatchObject({ segment: '2', decision: 'defer' });
  });

  it('SBR-26-0413: angina without obstruction, structural microvascular dysfunction', () => {
    const r = records.get('SBR-26-0413')!;
    const a = analyses.get('SBR-26-0413')!;
    const lad = vesselResult('SBR-26-0413', 'LAD');
    expect(r.state).toBe('awaiting-signature');
    // FFR 75/85 = 0.88 (hand-computed), normal above 0.80 — ESC 2024.
    expect(lad.ffr).toBeCloseTo(0.88, 2);
    expect(lad.ffrFlag).toBe('normal');
    // CFR = mean Tmn rest / mean Tmn hyperaemia = 0.727/0.453 = 1.60 (hand-computed); < 2.0 abnormal — EAPCI 2020.
    expect(lad.cfr).toBeCloseTo(1.6, 2);
    expect(lad.cfrFlag).toBe('abnormal');
    // IMR = Pd × Tmn = 75 × 0.453 = 34.0 U (hand-computed); ≥ 25 abnormal — ESC 2024; EAPCI 2020.
    expect(lad.imr).toBeCloseTo(34, 1);
    expect(lad.imrFlag).toBe('abnormal');
    // Low CFR with high IMR = structural microvascular angina — EAPCI 2020; COVADIS.
    expect(a.endotype).toBe('microvascular-angina');
    expect(a.findings).toEqual({ obstructive: false, microvascular: 'structural', microvascularDysfunction: true, endothelialDysfunction: false, vasospasm: null });
    // Acetylcholine 2/20/100 µg (ESC 2024 protocol), < 20% constriction and no symptoms — negative (from memory: 20%; COVADIS).
    expect(r.vasoreactivity.doses.map((d) => d.micrograms)).toEqual([2, 20, 100]);
    expect(a.vasoreactivity?.result).toBe('negative');
    expect(waitingSince(new Date(r.details.procedureEndedAt!), now).overdue).toBe(false);
  });

  it('SBR-26-0414: rest angina at night, epicardial vasospasm', () => {
    const r = records.get('SBR-26-0414')!;
    const a = analyses.get('SBR-26-0414')!;
    const lad = vesselResult('SBR-26-0414', 'LAD');
    expect(r.state).toBe('draft');
    // FFR 80/88 = 0.91 normal (> 0.80, ESC 2024); CFR 0.84/0.25 = 3.36 normal (≥ 2.5 upper borderline limit, ESC 2024);
    // IMR 80 × 0.25 = 20 normal (< 25, ESC 2024; EAPCI 2020). All hand-computed.
    expect(lad).toMatchObject({ ffrFlag: 'normal', cfrFlag: 'normal', imrFlag: 'normal' });
    expect(lad.cfr).toBeCloseTo(3.36, 2);
    expect(lad.imr).toBeCloseTo(20, 1);
    // ≥ 90% constriction with the usual symptoms and ischaemic ECG = epicardial spasm — COVADIS; ESC 2024.
    const d100 = r.vasoreactivity.doses.find((d) => d.micrograms === 100)!;
    expect(d100).toMatchObject({ vessel: 'LAD', symptoms: true, ischemicEcg: true });
    expect(d100.constrictionPct).toBeGreaterThanOrEqual(90);
    expect(a.doseResults?.find((d) => d.micrograms === 100)?.result).toBe('epicardial-spasm');
    expect(a.endotype).toBe('vasospastic-angina');
    expect(a.findings).toEqual({ obstructive: false, microvascular: null, microvascularDysfunction: false, endothelialDysfunction: false, vasospasm: 'epicardial' });
    expect(r.vasoreactivity.nitrateReversal).toBe(true);
  });

  it('SBR-26-0415: everything normal, acetylcholine negative', () => {
    const r = records.get('SBR-26-0415')!;
    const a = analyses.get('SBR-26-0415')!;
    const lad = vesselResult('SBR-26-0415', 'LAD');
    expect(r.state).toBe('amended');
    // FFR 83/90 = 0.92 (> 0.80, ESC 2024); CFR 0.78/0.26 = 3.0 (≥ 2.5, ESC 2024); IMR 83 × 0.26 = 21.6 (< 25, ESC 2024). Hand-computed.
    expect(lad).toMatchObject({ ffrFlag: 'normal', cfrFlag: 'normal', imrFlag: 'normal' });
    expect(lad.cfr).toBeCloseTo(3.0, 2);
    expect(lad.imr).toBeCloseTo(21.58, 2);
    // Acetylcholine up to 200 µg (ESC 2024 protocol), at most 15% constriction, no symptoms — negative (COVADIS).
    expect(a.vasoreactivity?.result).toBe('negative');
    // Epicardial, microvascular and acetylcholine all assessed and normal — no abnormality (EAPCI 2020).
    expect(a.endotype).toBe('no-abnormality');
    expect(a.findings).toEqual({ obstructive: false, microvascular: null, microvascularDysfunction: false, endothelialDysfunction: false, vasospasm: null });
  });

  it('SBR-26-0416: functional microvascular dysfunction, overdue for signature', () => {
    const r = records.get('SBR-26-0416')!;
    const a = analyses.get('SBR-26-0416')!;
    const lad = vesselResult('SBR-26-0416', 'LAD');
    expect(r.state).toBe('awaiting-signature');
    // Ended 40 h ago against the 24 h target (common practice; the deadline is hospital policy).
    expect(defaultSignatureTargetHours).toBe(24);
    const waiting = waitingSince(new Date(r.details.procedureEndedAt!), now);
    expect(waiting.hoursWaiting).toBeCloseTo(40, 3);
    expect(waiting.overdue).toBe(true);
    // CFR 0.39/0.22 = 1.77 (< 2.0 abnormal, EAPCI 2020) with IMR 76 × 0.22 = 16.7 (< 25 normal, ESC 2024): hand-computed.
    expect(lad.cfr).toBeCloseTo(1.77, 2);
    expect(lad).toMatchObject({ ffrFlag: 'normal', cfrFlag: 'abnormal', imrFlag: 'normal' });
    expect(lad.imr).toBeCloseTo(16.72, 2);
    // Low CFR with normal IMR = functional microvascular angina — EAPCI 2020; CorMicA.
    expect(a.endotype).toBe('microvascular-angina');
    expect(a.findings).toEqual({ obstructive: false, microvascular: 'functional', microvascularDysfunction: true, endothelialDysfunction: true, vasospasm: null });
    // 40% constriction without symptoms or ECG changes: endothelial dysfunction, not spasm — COVADIS; ≥ 20% from memory.
    expect(a.vasoreactivity?.result).toBe('endothelial-dysfunction');
  });
});

describe('measurement quality', () => {
  it('the only warning in the demo is the deliberate drift check in the SBR-26-0416 circumflex', () => {
    const warnings = accessions.flatMap((accession) => {
      const a = analyses.get(accession)!;
      return [
        ...a.vessels.flatMap((v) => v.warnings.map((w) => ({ accession, vessel: v.vessel, code: w.code }))),
        ...a.warnings.map((w) => ({ accession, vessel: null, code: w.code })),
      ];
    });
    // Drift Pd/Pa at the guide tip 1.03, outside 0.98–1.02 (from memory; Cook et al. 2016 for > 2 mmHg).
    expect(warnings).toEqual([{ accession: 'SBR-26-0416', vessel: 'LCX', code: 'drift-out-of-range' }]);
    expect(records.get('SBR-26-0416')!.vessels.find((v) => v.vessel === 'LCX')!.driftPdPa).toBe(1.03);
  });
});
