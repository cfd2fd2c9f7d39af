import { changeText, recordChanges } from '../../shared/study/record-changes';
import { driftOutOfRange, driftText } from '../../shared/physiology/quality';
import { stenosisText } from '../../shared/physiology/endotype';
import { constrictionText, protocolShortfalls, shortfallText } from '../../shared/physiology/vasoreactivity';
import { rightCoronaryVessels } from '../../shared/physiology/vessels';
import {
  defaultThresholds,
  endotypeName,
  formatQuantity,
  formatWithUnit,
  thresholdCitations,
  vesselLongName,
  vesselShortName,
  type Flag,
  type PhysiologyResult,
  type QuantityKind,
  type ThresholdKey,
  type Thresholds,
  type VesselCode,
  type VesselResult,
} from '../../shared/physiology';
import { notUsedSentence } from '../../shared/physiology/not-used';
import { cite, cutOffRule, cutOffSymbol, type CutOffKey } from '../../shared/physiology/thresholds';
import { endotypeLabel, flagLabel, imrMethodLabel, nhprKindLabel, reportCaution, vasoreactivityOutcomeLabel } from '../../shared/report/labels';
import { hasPressureIndex } from '../../shared/report/completeness';
import { decisionText, isLesion } from '../../shared/report/decision';
import { reportKindOf, type ReportKind } from '../../shared/report/kind';
import type { ThresholdsBasisInfo } from '../../shared/report/thresholds-basis';
import type { StudySections } from '../../shared/study/schema';
import * as vocabulary from '../../shared/study/vocabulary';
import { REPORT_TEMPLATE_VERSION } from './template-version';
import { versionNumber } from './template-versions';

export { reportKindOf, type ReportKind };

/**
 * The report's view model: everything the narrative templates and the PDF print, already in words.
 * Numbers pass through the one display-precision rule (`shared/physiology/precision.ts`), labels come
 * from the shared vocabulary, and an absent optional value leaves no sentence, row or column behind.
 * Free text (indication, impression, plan, complication details) stays raw here: each renderer
 * escapes it for its medium.
 */

/** What the report is about, from the study's clinical question. */

export interface ReportStudy extends Pick<StudySections, 'patient' | 'details' | 'setup' | 'vessels' | 'vasoreactivity' | 'findings'> {
  id: string;
  accession: string;
  /** What coding and delivery need from the signed record (patient class for the EHR's Encounter). */
  coding?: StudySections['coding'];
}

export interface ReportSignature {
  /** The signer's display name. */
  signedBy: string;
  /** ISO 8601 time of signing. */
  signedAt: string;
  /** 1 for the first signed version, then one more per addendum. */
  reportVersion: number;
  /** SHA-256 (hex) of the canonical signed content; the report prints its short form. */
  fingerprint: string;
  /** For an addendum: the reason given when it was opened. */
  amendmentReason?: string | null;
}

export interface ReportInput {
  study: ReportStudy;
  analysis: PhysiologyResult;
  thresholds: Thresholds;
  /** Display names of the people the record refers to by id. */
  people: { operator: string | null };
  hospital?: { name: string; lab: string } | null;
  /** Present once signed; a preview has none. */
  signature?: ReportSignature | null;
  /** IANA time zone for printed times (the hospital's); UTC by default. */
  timeZone?: string;
  /** The template version to lay the report out with (the lab's active one); the built-in version by default. */
  templateVersion?: string;
  /** Which thresholds judge this report, for the sentence templates from v2 print under them. */
  thresholdsBasis?: ThresholdsBasisInfo | null;
  /** For an addendum: the signed version it supersedes. */
  amends?: AmendedVersion | null;
}

/** The signed version an addendum supersedes, as the addendum names it. */
export interface AmendedVersion {
  versionNo: number;
  /** ISO 8601 time it was signed. */
  signedAt: string;
  signedBy: string;
  /** Its content fingerprint (SHA-256, hex). */
  fingerprint: string;
  /** Its signed record, to say what the addendum changes. */
  record: Record<string, unknown>;
}

export interface Cell {
  text: string;
  /** A footnote mark printed after the text ("†"), explained in the table's footnotes. */
  mark?: string;
  flag?: Flag;
  /** The flag in words, for the plain-text report and the PDF. */
  flagText?: string;
}

export interface Table {
  columns: string[];
  rows: Cell[][];
  /** Notes printed under the table, each opening with the mark it explains. */
  footnotes?: string[];
}

export interface VesselInterpretation {
  vessel: string;
  sentences: string[];
}

export interface DoseRow {
  dose: string;
  vessel: string;
  constriction: string;
  symptoms: string;
  ecg: string;
  result: string;
  notes: string;
}

export interface ReportView {
  templateVersion: string;
  kind: ReportKind;
  title: string;
  hospital: { name: string; lab: string } | null;
  patient: { name: string; mrn: string; birthDate: string; sex: string };
  /** Label/value pairs for the identification block (only those recorded). */
  identification: Array<{ label: string; value: string }>;
  indication: { text: string | null; question: string | null };
  technique: string[];
  measurements: Table | null;
  indices: Table | null;
  interpretation: VesselInterpretation[];
  /** Lesion studies: one line on the lesion(s) and the decision. */
  lesionSummary: string[];
  acetylcholine: { protocol: string; doses: DoseRow[]; doseColumns: Array<{ key: keyof DoseRow; label: string }>; result: string | null; reversal: string | null } | null;
  /** Coronary function studies only. */
  endotype: { label: string; headline: string; reasons: string[] } | null;
  quality: string[];
  complications: string[];
  impression: string[];
  plan: string[];
  thresholds: Array<{ label: string; value: string; source: string }>;
  /** One sentence on which thresholds judged the report (template v2 and later); null otherwise. */
  thresholdsBasis: string | null;
  caution: string;
  /** An addendum says which version it supersedes, why, and what it changes; null for a first version. */
  amendment: null | {
    /** "Supersedes version 1, signed … by … (fingerprint …)." */
    supersedes: string;
    /** The reason the signer gave (null in a preview, before it is given). */
    reason: string | null;
    /** Each changed field as a person reads it ("Procedure › Access site: right radial → right femoral"). */
    changes: string[];
  };
  signature: null | {
    signedBy: string;
    /** Printed time of signing, in the report's zone. */
    signedAt: string;
    /** The same time as given (ISO 8601): the PDF's creation date. */
    signedAtIso: string;
    reportVersion: number;
    fingerprint: string;
    shortFingerprint: string;
    amendmentReason: string | null;
  };
}

// ---------------------------------------------------------------------------------------------
// Small formatting helpers

const q = (v: number, kind: QuantityKind) => formatQuantity(v, kind);
/** No-break space: joins a number to its unit in table cells. */
const NBSP = '\u00a0';
const withUnit = (v: number, kind: QuantityKind) => formatWithUnit(v, kind);
const isNum = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);
const filled = (s: unknown): s is string => typeof s === 'string' && s.trim().length > 0;
const sentence = (s: string) => {
  const t = s.trim();
  if (!t) return t;
  const first = t[0].toUpperCase() + t.slice(1);
  return /[.!?]$/.test(first) ? first : `${first}.`;
};
const lowerFirst = (s: string) => (s ? s[0].toLowerCase() + s.slice(1) : s);
const joinAnd = (xs: readonly string[]) => (xs.length <= 1 ? xs.join('') : `${xs.slice(0, -1).join(', ')} and ${xs[xs.length - 1]}`);

/**
 * Quantities that are not physiological indices (contrast volume, fluoroscopy minutes, radiation
 * dose): as entered, to at most one decimal, without trailing zeros.
 */
function plain(v: number): string {
  const r = Math.round(v * 10) / 10;
  return Number.isInteger(r) ? String(r) : r.toFixed(1);
}

/** First 16 hex digits of a SHA-256 in four groups, as printed on the report. */
export function shortFingerprint(hex: string): string {
  return (hex.slice(0, 16).match(/.{1,4}/g) ?? []).join('-');
}

const formatters = new Map<string, Intl.DateTimeFormat>();
/** Intl formatters are costly to build: one per zone and style, kept. */
function formatter(timeZone: string, style: 'date-time' | 'time'): Intl.DateTimeFormat {
  const key = `${timeZone} ${style}`;
  let f = formatters.get(key);
  if (!f) {
    f = new Intl.DateTimeFormat(
      'en-GB',
      style === 'time'
        ? { timeZone, hour: '2-digit', minute: '2-digit', hourCycle: 'h23' }
        : { timeZone, day: 'numeric', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit', hourCycle: 'h23', timeZoneName: 'short' },
    );
    formatters.set(key, f);
  }
  return f;
}

/** A time in the report's zone, e.g. "2 Dec 2026, 14:05 UTC". */
function formatDateTime(iso: string, timeZone = 'UTC'): string {
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  const parts = formatter(timeZone, 'date-time').formatToParts(d);
  const get = (t: string) => parts.find((p) => p.type === t)?.value ?? '';
  return `${get('day')} ${get('month')} ${get('year')}, ${get('hour')}:${get('minute')} ${get('timeZoneName')}`;
}

function formatTime(iso: string, timeZone: string): string {
  const d = new Date(iso);
  return Number.isNaN(d.getTime()) ? iso : formatter(timeZone, 'time').format(d);
}

/** A label from a vocabulary table that may not know the code yet. */
function labelOf(table: unknown, code: string | null | undefined): string | null {
  if (code === null || code === undefined) return null;
  const t = table as Record<string, string> | undefined;
  return t?.[code] ?? code;
}

/** The vocabulary's tables, read by name so that tables added later are used when present. */
const vocab = vocabulary as unknown as Record<string, unknown>;

/** Segment label from the shared segment model (codes are text such as "12a"; older records hold numbers). */
function segmentLabel(segment: unknown): string | null {
  if (segment === null || segment === undefined || segment === '') return null;
  const list = vocab.coronarySegments as ReadonlyArray<{ code?: string; n?: number; label: string }> | undefined;
  const hit = list?.find((s) => String(s.code ?? s.n) === String(segment));
  return hit ? hit.label : `segment ${String(segment)}`;
}

const vesselTitle = (code: VesselCode, segment: unknown) => {
  const seg = segmentLabel(segment);
  return seg ? `${vesselLongName[code]} (${seg})` : vesselLongName[code];
};

// ---------------------------------------------------------------------------------------------
// Technique

function techniqueSentences(study: ReportStudy, t: Thresholds): string[] {
  const d = study.details as ReportStudy['details'] & Record<string, unknown>;
  const s = study.setup as ReportStudy['setup'] & Record<string, unknown>;
  const out: string[] = [];

  const access = labelOf(vocabulary.accessSiteLabel, d.accessSite);
  const guide = isNum(d.guideFrench) ? `${d.guideFrench} Fr guide catheter` : null;
  if (access || guide) out.push(sentence([access ? `${access} access` : null, guide].filter(Boolean).join('; ')));

  const baseline: string[] = [];
  if (isNum(s.baselineHeartRate)) baseline.push(`heart rate ${plain(s.baselineHeartRate)} bpm`);
  if (isNum(s.baselineSystolic) && isNum(s.baselineDiastolic)) baseline.push(`blood pressure ${plain(s.baselineSystolic)}/${plain(s.baselineDiastolic)} mmHg`);
  const rhythm = labelOf(vocab.rhythmLabel, s.baselineRhythm as string | null | undefined);
  if (rhythm) baseline.push(lowerFirst(rhythm));
  if (isNum(s.lvedp)) baseline.push(`LVEDP ${q(s.lvedp, 'pressure')} mmHg`);
  if (baseline.length) out.push(sentence(`Baseline: ${baseline.join(', ')}`));

  if (isNum(s.heparinUnits)) {
    // The weight-based dose beside the total when the weight is recorded: the number only, no judgement.
    const perKg = isNum(d.weightKg) && d.weightKg > 0 ? ` (${Math.round(s.heparinUnits / d.weightKg)} U/kg)` : '';
    out.push(sentence(`Heparin ${q(s.heparinUnits, 'dose')} U${perKg}`));
  }

  if (s.nitratesGiven === true) {
    const dose = isNum(s.nitrateDoseMicrograms) ? ` ${withUnit(s.nitrateDoseMicrograms, 'dose')}` : '';
    const when =
      s.nitrateTiming === 'after-acetylcholine' ? ' after the acetylcholine test' : s.nitrateTiming === 'before-measurements' ? ' before the measurements' : '';
    out.push(sentence(`Nitroglycerin${dose} given${when}`));
  } else if (s.nitratesGiven === false) {
    out.push('No nitroglycerin before the measurements.');
  }

  if (s.hyperemicAgent === 'none') {
    out.push('No hyperaemic agent: resting indices only.');
  } else if (s.hyperemicAgent) {
    const agent = lowerFirst(labelOf(vocabulary.hyperemicAgentLabel, s.hyperemicAgent) ?? '');
    const route = s.hyperemicRoute ? ` ${lowerFirst(labelOf(vocabulary.drugRouteLabel, s.hyperemicRoute) ?? '')}` : '';
    const unit = labelOf(vocabulary.doseUnitLabel, s.hyperemicDoseUnit);
    const dose = isNum(s.hyperemicDose) ? ` ${q(s.hyperemicDose, 'dose')}${unit ? ` ${unit}` : ''}` : '';
    out.push(sentence(`Hyperaemia with${route} ${agent}${dose}`.replace(/\s+/g, ' ')));
  }

  const wire = labelOf(vocabulary.wirePositionLabel, s.wirePosition);
  if (wire) out.push(sentence(`Pressure wire sensor: ${lowerFirst(wire)}`));

  const prep: string[] = [];
  if (s.transducerZeroed === true) prep.push('transducer zeroed at heart level');
  if (s.transducerZeroed === false) prep.push('transducer not zeroed at heart level');
  if (s.equalizedInAorta === true) {
    prep.push(
      `pressures equalized with the sensor in the aorta${s.introducerRemoved === true ? ', introducer removed' : s.introducerRemoved === false ? ', introducer not removed' : ''}`,
    );
  } else if (s.equalizedInAorta === false) {
    prep.push('pressures not equalized in the aorta');
  }
  if (prep.length) out.push(sentence(prep.join('; ')));

  // Drift check: one clause per vessel with a pressure index.
  const drift: string[] = [];
  const window = `${q(t.driftLow, 'ratio')}–${q(t.driftHigh, 'ratio')}`;
  study.vessels.forEach((v) => {
    if (!hasPressureIndex(v)) return;
    const name = vesselShortName[v.vessel];
    if (isNum(v.driftPdPa)) {
      // Judged as entered, by the same rule as the screens' drift banner; a value outside the window
      // that would print as a bound (1.024 → "1.02") is printed with the decimals that keep it outside.
      const outside = driftOutOfRange(v.driftPdPa, t);
      drift.push(`${name} ${driftText(v.driftPdPa, t)} (${outside ? 'outside' : 'within'} ${window})`);
    } else {
      const reason = (v as { driftNotDoneReason?: string | null }).driftNotDoneReason;
      if (filled(reason)) drift.push(`${name} not done (${reason.trim()})`);
    }
  });
  if (drift.length) out.push(sentence(`Drift check, Pd/Pa with the sensor back at the guide tip: ${drift.join('; ')}`));

  const thermo: string[] = [];
  study.vessels.forEach((v) => {
    const r = v.restTransit.filter(isNum).length;
    const h = v.hyperemiaTransit.filter(isNum).length;
    if (r || h) thermo.push(`${vesselShortName[v.vessel]} ${r} at rest and ${h} at hyperaemia`);
  });
  if (thermo.length) out.push(sentence(`Bolus thermodilution with room-temperature saline, injections: ${thermo.join('; ')}`));

  const f = study.findings as ReportStudy['findings'] & Record<string, unknown>;
  const totals: string[] = [];
  if (isNum(f.contrastMl)) totals.push(`contrast ${plain(f.contrastMl)} mL`);
  if (isNum(f.fluoroscopyMinutes)) totals.push(`fluoroscopy ${plain(f.fluoroscopyMinutes)} min`);
  if (isNum(f.airKermaMGy)) totals.push(`air kerma ${plain(f.airKermaMGy)} mGy`);
  if (isNum(f.doseAreaProductGyCm2)) totals.push(`dose-area product ${plain(f.doseAreaProductGyCm2)} Gy·cm²`);
  if (totals.length) out.push(sentence(`Totals: ${totals.join(', ')}`));

  return out;
}

// ---------------------------------------------------------------------------------------------
// Tables

const flagCell = (text: string, flag: Flag | undefined): Cell => (flag ? { text, flag, flagText: flagLabel[flag] } : { text });
const dash: Cell = { text: '—' };

/** Keep only the columns in which some row has a value, and only rows with a value beyond the first column. */
function compact(columns: string[], rows: Array<Array<Cell | null>>): Table | null {
  const keepRow = rows.filter((r) => r.slice(1).some((c) => c !== null));
  if (keepRow.length === 0) return null;
  const keepCol = columns.map((_, i) => i === 0 || keepRow.some((r) => r[i] !== null));
  return {
    columns: columns.filter((_, i) => keepCol[i]),
    rows: keepRow.map((r) => r.filter((_, i) => keepCol[i]).map((c) => c ?? dash)),
  };
}

function measurementTable(study: ReportStudy, analysis: PhysiologyResult, t: Thresholds): Table | null {
  const byId = new Map(analysis.vessels.map((v) => [v.id, v]));
  const rows = study.vessels.map((v) => {
    const r = byId.get(v.id);
    const pair = (pa: number | null, pd: number | null) => (isNum(pa) && isNum(pd) ? { text: `${q(pa, 'pressure')} / ${q(pd, 'pressure')}` } : null);
    return [
      { text: vesselShortName[v.vessel] },
      segmentLabel(v.segment) ? { text: segmentLabel(v.segment)! } : null,
      isNum(v.visualStenosisPct) ? { text: `${stenosisText(v.visualStenosisPct, t)} %` } : null,
      pair(v.restPa, v.restPd),
      pair(v.hyperemiaPa, v.hyperemiaPd),
      r?.tmnRest !== undefined ? { text: q(r.tmnRest, 'transit') } : null,
      r?.tmnHyperemia !== undefined ? { text: q(r.tmnHyperemia, 'transit') } : null,
      isNum(v.wedgePressure) ? { text: q(v.wedgePressure, 'pressure') } : null,
    ];
  });
  return compact(['Vessel', 'Segment', 'Visual stenosis', 'Pa / Pd at rest (mmHg)', 'Pa / Pd at hyperaemia (mmHg)', 'Mean Tmn at rest (s)', 'Mean Tmn at hyperaemia (s)', 'Wedge pressure (mmHg)'], rows);
}

/** The mark of a vessel whose drift check fell outside the window, in the indices table. */
export const DRIFT_MARK = '†';

function indexTable(analysis: PhysiologyResult, study: ReportStudy, t: Thresholds): Table | null {
  const byId = new Map(study.vessels.map((v) => [v.id, v]));
  const drifted = (id: string) => {
    const d = byId.get(id)?.driftPdPa;
    return isNum(d) && driftOutOfRange(d, t);
  };
  const rows = analysis.vessels.map((r) => {
    const nhprText = r.nhpr !== undefined && r.nhprKind ? `${q(r.nhpr, 'ratio')} ${lowerFirst(nhprKindLabel[r.nhprKind])}` : null;
    const name: Cell = drifted(r.id) ? { text: vesselShortName[r.vessel], mark: DRIFT_MARK } : { text: vesselShortName[r.vessel] };
    return [
      name,
      r.ffr !== undefined ? flagCell(q(r.ffr, 'ratio'), r.ffrFlag) : null,
      nhprText ? flagCell(nhprText, r.nhprFlag) : null,
      r.restingPdPa !== undefined ? flagCell(q(r.restingPdPa, 'ratio'), r.restingPdPaFlag) : null,
      r.cfr !== undefined ? flagCell(q(r.cfr, 'ratio'), r.cfrFlag) : null,
      r.imr !== undefined ? flagCell(q(r.imr, 'imr'), r.imrFlag) : null,
      r.rrr !== undefined ? flagCell(q(r.rrr, 'ratio'), r.rrrFlag) : null,
      r.mrr !== undefined ? flagCell(q(r.mrr, 'ratio'), r.mrrFlag) : null,
    ];
  });
  const table = compact(['Vessel', 'FFR', 'Resting ratio', 'Resting Pd/Pa', 'CFR', 'IMR (U)', 'RRR', 'MRR'], rows);
  const marked = table?.rows.filter((row) => row[0].mark === DRIFT_MARK).length ?? 0;
  if (table && marked > 0) {
    table.footnotes = [
      `${DRIFT_MARK} Drift check outside ${q(t.driftLow, 'ratio')}–${q(t.driftHigh, 'ratio')}: pressure ratios of ${marked > 1 ? 'these vessels' : 'this vessel'} are less reliable.`,
    ];
  }
  return table;
}

// ---------------------------------------------------------------------------------------------
// Interpretation

interface UsedThresholds {
  add(key: ThresholdKey): void;
  keys: ThresholdKey[];
}
function usedThresholds(): UsedThresholds {
  const keys: ThresholdKey[] = [];
  return {
    keys,
    add(key) {
      if (!keys.includes(key)) keys.push(key);
    },
  };
}

const nhprKey = { 'whole-cycle': 'nhprWholeCycle', diastolic: 'nhprDiastolic', 'full-cycle-minimum': 'nhprFullCycleMinimum' } as const;

function judged(flag: Flag | undefined): string {
  return flag ? flagLabel[flag] : 'not judged';
}

function vesselSentences(
  r: VesselResult,
  row: ReportStudy['vessels'][number] | undefined,
  kind: ReportKind,
  afterPci: boolean,
  t: Thresholds,
  used: UsedThresholds,
  qualifyUnused: boolean,
): string[] {
  const out: string[] = [];
  // CFR, IMR, RRR and MRR draw no microvascular finding where obstruction was not excluded (COVADIS);
  // from template v3 their sentences say so.
  const unused = !qualifyUnused
    ? ''
    : r.obstructive === true
      ? notUsedSentence('obstructive')
      : r.obstructive === undefined
        ? notUsedSentence('not-excluded')
        : '';
  const against = (op: string, key: ThresholdKey, kind: QuantityKind = 'ratio', unit = '') => `(cut-off ${op} ${q(t[key], kind)}${unit}, ${cite(t, key)})`;

  if (r.ffr !== undefined) {
    used.add('ffr');
    const grey = r.ffrGreyZone ? `; in the grey zone ${q(t.ffrGreyZoneLow, 'ratio')}–${q(t.ffr, 'ratio')}` : '';
    if (r.ffrGreyZone) used.add('ffrGreyZoneLow');
    out.push(`FFR ${q(r.ffr, 'ratio')}: ${judged(r.ffrFlag)} ${against('≤', 'ffr')}${grey}.`);
  }
  if (r.nhpr !== undefined && r.nhprKind) {
    const key = nhprKey[r.nhprKind];
    used.add(key);
    out.push(`${nhprKindLabel[r.nhprKind]} ${q(r.nhpr, 'ratio')}: ${judged(r.nhprFlag)} ${against('≤', key)}.`);
  }
  if (r.restingPdPa !== undefined && !(r.nhpr !== undefined && r.nhprKind === 'whole-cycle')) {
    used.add('restingPdPa');
    out.push(`Resting whole-cycle Pd/Pa from the pressures ${q(r.restingPdPa, 'ratio')}: ${judged(r.restingPdPaFlag)} ${against('≤', 'restingPdPa')}.`);
  }
  if (r.cfr !== undefined) {
    used.add('cfr');
    const band = t.cfrBorderline > t.cfr ? `; borderline from ${q(t.cfr, 'ratio')} to below ${q(t.cfrBorderline, 'ratio')}` : '';
    if (band) used.add('cfrBorderline');
    out.push(`CFR ${q(r.cfr, 'ratio')}: ${judged(r.cfrFlag)} ${against('<', 'cfr')}${band}.${unused}`);
  }
  if (r.imr !== undefined) {
    used.add('imr');
    const method = r.imrMethod && r.imrMethod !== 'pd-tmn' ? `, ${imrMethodLabel[r.imrMethod]}` : '';
    const raw = r.imrMethod && r.imrMethod !== 'pd-tmn' && r.imrUncorrected !== undefined ? `; uncorrected ${withUnit(r.imrUncorrected, 'imr')}` : '';
    out.push(`IMR ${withUnit(r.imr, 'imr')}${method}: ${judged(r.imrFlag)} ${against('≥', 'imr', 'imr', ' U')}${raw}.${unused}`);
  }
  if (r.rrr !== undefined) {
    used.add('rrr');
    out.push(`RRR ${q(r.rrr, 'ratio')}: ${judged(r.rrrFlag)} ${against('<', 'rrr')}.${unused}`);
  }
  if (r.mrr !== undefined) {
    used.add('mrr');
    used.add('mrrBorderline');
    const method = r.mrrMethod === 'bolus-thermodilution' ? ' Computed from bolus thermodilution; these cut-offs were set with continuous thermodilution.' : '';
    // One bracket for both cut-offs: abnormal below the MRR cut-off, normal above the borderline's upper limit.
    const bands = t.mrrBorderline > t.mrr ? `abnormal < ${q(t.mrr, 'ratio')}, normal > ${q(t.mrrBorderline, 'ratio')}` : `abnormal < ${q(t.mrr, 'ratio')}`;
    const sources = [...new Set([cite(t, 'mrr'), ...(t.mrrBorderline > t.mrr ? [cite(t, 'mrrBorderline')] : [])])].join('; ');
    out.push(`MRR ${q(r.mrr, 'ratio')}: ${judged(r.mrrFlag)} (${bands}; ${sources}).${method}${unused}`);
  }

  // The epicardial verdict, in the words of the report's kind.
  if (r.obstructive !== undefined) {
    const by =
      r.judgedBy === 'visual-stenosis'
        ? `visual stenosis ${stenosisText(r.visualStenosisPct ?? 0, t)} %, no pressure index`
        : r.judgedBy === 'ffr'
          ? 'FFR'
          : r.judgedBy === 'nhpr' && r.nhprKind
            ? lowerFirst(nhprKindLabel[r.nhprKind])
            : 'resting Pd/Pa';
    if (r.judgedBy === 'visual-stenosis') used.add('obstructiveStenosisPct');
    if (kind === 'lesion' && afterPci) {
      out.push(
        r.obstructive
          ? `A haemodynamically significant gradient remains after intervention (judged by ${by}).`
          : `No haemodynamically significant gradient remains after intervention (judged by ${by}).`,
      );
    } else if (kind === 'lesion' && r.judgedBy === 'visual-stenosis') {
      // A visual estimate says nothing of the lesion's physiology (COVADIS: ≥ 50% is angiographic obstruction only).
      out.push(
        r.obstructive
          ? `The lesion is angiographically obstructive by visual estimate (${by}); it was not assessed physiologically.`
          : `The lesion is not angiographically obstructive by visual estimate (${by}); it was not assessed physiologically.`,
      );
    } else if (kind === 'lesion') {
      out.push(r.obstructive ? `The lesion is haemodynamically significant (judged by ${by}).` : `The lesion is not haemodynamically significant (judged by ${by}).`);
    } else {
      out.push(r.obstructive ? `Obstructive epicardial disease (judged by ${by}).` : `No obstructive epicardial disease (judged by ${by}).`);
    }
  }
  if (row?.pullbackPattern && row.pullbackPattern !== 'not-done') {
    out.push(sentence(`Pull-back: ${lowerFirst(vocabulary.pullbackPatternLabel[row.pullbackPattern])}`));
  }
  const decision = row ? decisionText(row) : null;
  if (row && decision) out.push(sentence(isLesion(row) ? `Decision: ${lowerFirst(decision)}` : decision));
  return out;
}

function lesionSummary(study: ReportStudy, analysis: PhysiologyResult, afterPci: boolean, t: Thresholds): string[] {
  const rows = new Map(study.vessels.map((v) => [v.id, v]));
  const out: string[] = [];
  for (const r of analysis.vessels) {
    if (r.obstructive === undefined) continue;
    const row = rows.get(r.id);
    const index =
      r.ffr !== undefined
        ? `FFR ${q(r.ffr, 'ratio')}`
        : r.nhpr !== undefined && r.nhprKind
          ? `${lowerFirst(nhprKindLabel[r.nhprKind])} ${q(r.nhpr, 'ratio')}`
          : r.restingPdPa !== undefined
            ? `resting Pd/Pa ${q(r.restingPdPa, 'ratio')}`
            : `visual stenosis ${stenosisText(r.visualStenosisPct ?? 0, t)} %`;
    const where = vesselTitle(r.vessel, row?.segment);
    const decisionWords = row ? decisionText(row) : null;
    const decision = decisionWords ? `; ${lowerFirst(decisionWords)}` : '';
    const verdict = afterPci
      ? r.obstructive
        ? 'significant gradient remains after intervention'
        : 'no significant gradient remains after intervention'
      : r.judgedBy === 'visual-stenosis'
        ? r.obstructive
          ? 'angiographically obstructive by visual estimate, not assessed physiologically'
          : 'not angiographically obstructive by visual estimate, not assessed physiologically'
        : r.obstructive
          ? 'haemodynamically significant'
          : 'not haemodynamically significant';
    out.push(sentence(`${where}: ${verdict} (${index})${decision}`));
  }
  return out;
}

// ---------------------------------------------------------------------------------------------
// Acetylcholine

const yesNo = (b: boolean | null | undefined) => (b === true ? 'Yes' : b === false ? 'No' : '—');

function acetylcholineSection(study: ReportStudy, analysis: PhysiologyResult, t: Thresholds, used: UsedThresholds): ReportView['acetylcholine'] {
  const doses = study.vasoreactivity.doses;
  if (doses.length === 0) return null;
  used.add('spasmConstrictionPct');
  // The core classifies the complete doses, in order.
  const results = [...(analysis.doseResults ?? [])];
  const complete = (d: (typeof doses)[number]) => isNum(d.micrograms) && isNum(d.constrictionPct) && d.symptoms !== null && d.ischemicEcg !== null;
  const rows: DoseRow[] = doses.map((d) => {
    const extra = d as typeof d & Record<string, unknown>;
    const res = complete(d) ? results.shift() : undefined;
    const notes: string[] = [];
    const spasmVessel = extra.spasmVessel as VesselCode | null | undefined;
    const spasmWhere = [spasmVessel ? vesselShortName[spasmVessel] : null, segmentLabel(extra.spasmSegment)].filter(Boolean).join(', ');
    const pattern = labelOf(vocab.spasmPatternLabel, extra.spasmPattern as string | null | undefined);
    if (spasmWhere || pattern) notes.push(`constriction in ${[spasmWhere, pattern ? lowerFirst(pattern) : null].filter(Boolean).join(', ')}`);
    const vitals: string[] = [];
    if (isNum(extra.heartRate)) vitals.push(`HR ${plain(extra.heartRate)} bpm`);
    if (isNum(extra.systolic) && isNum(extra.diastolic)) vitals.push(`BP ${plain(extra.systolic)}/${plain(extra.diastolic)} mmHg`);
    const rhythm = labelOf(vocab.rhythmLabel, extra.rhythm as string | null | undefined);
    if (rhythm) vitals.push(lowerFirst(rhythm));
    if (vitals.length) notes.push(vitals.join(', '));
    return {
      // Number and unit held together (no-break space, U+00A0) so a narrow column never splits "100 µg".
      dose: isNum(d.micrograms) ? withUnit(d.micrograms, 'dose').replace(/ /g, NBSP) : '—',
      vessel: vesselShortName[d.vessel],
      constriction: isNum(d.constrictionPct) ? `${constrictionText(d.constrictionPct, t)} %` : '—',
      symptoms: yesNo(d.symptoms),
      ecg: yesNo(d.ischemicEcg),
      result: res ? vasoreactivityOutcomeLabel[res.result] : '—',
      notes: notes.join('; '),
    };
  });
  const columns: Array<{ key: keyof DoseRow; label: string }> = [
    { key: 'dose', label: 'Dose' },
    { key: 'vessel', label: 'Into' },
    { key: 'constriction', label: 'Diameter reduction' },
    { key: 'symptoms', label: 'Usual symptoms' },
    { key: 'ecg', label: 'Ischaemic ECG' },
    { key: 'result', label: 'Response' },
  ];
  if (rows.some((r) => r.notes)) columns.push({ key: 'notes', label: 'Notes' });

  const vessels = [...new Set(doses.map((d) => vesselShortName[d.vessel]))];
  const amounts = doses.filter((d) => isNum(d.micrograms)).map((d) => q(d.micrograms as number, 'dose'));
  const protocol = sentence(
    `Intracoronary acetylcholine into the ${joinAnd(vessels)}${amounts.length ? `, ${amounts.length === 1 ? 'one dose' : `${amounts.length} doses`} of ${joinAnd(amounts)} µg` : ''}, each followed by angiography`,
  );
  const outcome = analysis.vasoreactivity?.result;
  // A negative test that stopped before the protocol's last dose says how far it went.
  const sides = new Set(doses.map((d) => (rightCoronaryVessels.has(d.vessel) ? 'right' : 'left')));
  const short = outcome === 'negative' ? shortfallText(protocolShortfalls(doses, t), sides.size > 1) : '';
  const result = outcome
    ? `${sentence(`Result: ${lowerFirst(vasoreactivityOutcomeLabel[outcome])}${short ? ` ${short}` : ''}`)} Spasm is judged as constriction of ${q(t.spasmConstrictionPct, 'percent')}% or more with the usual symptoms and ischaemic ECG changes (${cite(t, 'spasmConstrictionPct')}).`
    : null;
  const v = study.vasoreactivity as ReportStudy['vasoreactivity'] & Record<string, unknown>;
  const ntg = isNum(v.reversalNitroglycerinMicrograms) ? ` ${withUnit(v.reversalNitroglycerinMicrograms, 'dose')}` : '';
  const reversal =
    v.nitrateReversal === true
      ? `Spasm reversed with intracoronary nitroglycerin${ntg}.`
      : v.nitrateReversal === false
        ? `Spasm not reversed with intracoronary nitroglycerin${ntg}.`
        : ntg
          ? `Intracoronary nitroglycerin${ntg} after the test.`
          : null;
  return { protocol, doses: rows, doseColumns: columns, result, reversal };
}

// ---------------------------------------------------------------------------------------------
// Complications, free text

/** Free text split into paragraphs (blank lines) with single line breaks kept as spaces. */
function paragraphs(text: string | null | undefined): string[] {
  if (!filled(text)) return [];
  return text
    .replace(/\r\n?/g, '\n')
    .split(/\n\s*\n/)
    .map((p) => p.replace(/\s*\n\s*/g, ' ').trim())
    .filter((p) => p.length > 0);
}

/** Free text that opens by saying there was no complication ("No complication.", "None: …", "No complications; …"). */
const saysNoComplication = (text: string) => /^(none|no complications?)\b/i.test(text.trim());

function complicationLines(findings: ReportStudy['findings']): string[] {
  const kinds = (findings as { complicationKinds?: readonly string[] }).complicationKinds;
  const details = paragraphs(findings.complications);
  if (Array.isArray(kinds) && kinds.length > 0) {
    // "Other" is told by its description, not by the word.
    const named = kinds.filter((k) => k !== 'other' || details.length === 0);
    const labels = named.map((k) => labelOf(vocab.complicationLabel, k) ?? k).map((l) => l.replace(/\s*\(describe below\)$/i, ''));
    if (kinds.includes('none')) {
      // Details that only repeat "none" are not printed twice; details that open by saying there was no
      // complication stand alone, without "None." before them.
      const said = details.filter((d) => !/^none\.?$/i.test(d));
      return said.length > 0 && saysNoComplication(said[0]) ? said : ['None.', ...said];
    }
    const listed = labels.length ? [sentence(joinAnd(labels.map((l, i) => (i === 0 ? l : lowerFirst(l)))))] : [];
    return [...listed, ...details];
  }
  return details.length ? details : ['Not recorded.'];
}

// ---------------------------------------------------------------------------------------------
// The builder

export const thresholdText = (key: ThresholdKey, t: Thresholds): { label: string; value: string } => {
  const r = (k: ThresholdKey) => q(t[k], 'ratio');
  // The direction of each cut-off is the one the analysis judges by (`cutOffRule`).
  const is = (k: CutOffKey) => cutOffSymbol[cutOffRule[k]];
  switch (key) {
    case 'ffr':
      return { label: 'FFR abnormal', value: `${is('ffr')} ${r('ffr')}` };
    case 'ffrGreyZoneLow':
      return { label: 'FFR grey zone', value: `${r('ffrGreyZoneLow')}–${r('ffr')}` };
    case 'nhprWholeCycle':
      return { label: 'Whole-cycle Pd/Pa (entered) abnormal', value: `${is(key)} ${r(key)}` };
    case 'nhprDiastolic':
      return { label: 'Diastolic ratio abnormal', value: `${is(key)} ${r(key)}` };
    case 'nhprFullCycleMinimum':
      return { label: 'Full-cycle minimum ratio abnormal', value: `${is(key)} ${r(key)}` };
    case 'restingPdPa':
      return { label: 'Resting whole-cycle Pd/Pa abnormal', value: `${is(key)} ${r(key)}` };
    case 'cfr':
      return { label: 'CFR abnormal', value: `${is('cfr')} ${r('cfr')}` };
    case 'cfrBorderline':
      return { label: 'CFR borderline', value: `${r('cfr')} to ${is('cfrBorderline')} ${r('cfrBorderline')}` };
    case 'imr':
      return { label: 'IMR abnormal', value: `${is('imr')} ${q(t.imr, 'imr')} U` };
    case 'rrr':
      return { label: 'RRR abnormal', value: `${is('rrr')} ${r('rrr')}` };
    case 'mrr':
      return { label: 'MRR abnormal', value: `${is('mrr')} ${r('mrr')}` };
    case 'mrrBorderline':
      return { label: 'MRR borderline', value: `${r('mrr')}–${r('mrrBorderline')}` };
    case 'driftLow':
      return { label: 'Drift check window (Pd/Pa)', value: `${r('driftLow')}–${r('driftHigh')}` };
    case 'spasmConstrictionPct':
      return { label: 'Epicardial spasm', value: `≥ ${q(t.spasmConstrictionPct, 'percent')}% with symptoms and ischaemic ECG` };
    case 'obstructiveStenosisPct':
      return { label: 'Obstructive by visual stenosis (no pressure index)', value: `≥ ${q(t.obstructiveStenosisPct, 'percent')}%` };
    default:
      return { label: key, value: String(t[key]) };
  }
};

/** Where a cut-off comes from: its short citation while the default is in use, else the lab's setting. */
function thresholdSource(key: ThresholdKey, t: Thresholds): string {
  const keys: ThresholdKey[] = key === 'driftLow' ? ['driftLow', 'driftHigh'] : [key];
  return keys.every((k) => t[k] === defaultThresholds[k]) ? thresholdCitations[key] : 'lab setting';
}

/** The sentence under the thresholds table (template v2 and later). */
export function thresholdsBasisSentence(b: ThresholdsBasisInfo, tz: string): string {
  const set = b.setId === null ? 'the published default thresholds' : `the lab's thresholds in force from ${b.effectiveFrom ? formatDateTime(b.effectiveFrom, tz) : 'an earlier date'}`;
  if (b.basis === 'original') return `This addendum keeps the thresholds of report version ${b.amendedVersion ?? 1}: ${set}.`;
  if (b.basis === 'current') return `This addendum applies the thresholds in force when it was signed, not those of report version ${b.amendedVersion ?? 1}: ${set}.`;
  return `Judged by ${set}.`;
}


/** The signature block of the view (null for a preview); the rest of the view does not depend on it. */
export function signatureView(signature: ReportSignature | null, tz: string): ReportView['signature'] {
  return signature
    ? {
        signedBy: signature.signedBy,
        signedAt: formatDateTime(signature.signedAt, tz),
        signedAtIso: signature.signedAt,
        reportVersion: signature.reportVersion,
        fingerprint: signature.fingerprint,
        shortFingerprint: shortFingerprint(signature.fingerprint),
        amendmentReason: filled(signature.amendmentReason) ? signature.amendmentReason.trim() : null,
      }
    : null;
}

/** Builds the report's view model. Pure: the same input gives the same view. */
export function buildReportView(input: ReportInput): ReportView {
  const { study, analysis, thresholds: t } = input;
  const tz = input.timeZone ?? 'UTC';
  const kind = reportKindOf(study);
  const afterPci = study.details.clinicalQuestion === 'post-pci';
  const used = usedThresholds();
  const p = study.patient;
  const d = study.details;

  const identification: ReportView['identification'] = [];
  const idn = (label: string, value: string | null | undefined) => {
    if (filled(value)) identification.push({ label, value: value.trim() });
  };
  idn('Patient', `${p.familyName.toUpperCase()}, ${p.givenName}`);
  idn('MRN', p.mrn);
  idn('Birth date', p.birthDate);
  idn('Sex', vocabulary.sexLabel[p.sex]);
  idn('Accession', study.accession);
  idn('Encounter', d.encounter);
  if (d.procedureStartedAt) {
    idn('Procedure', `${formatDateTime(d.procedureStartedAt, tz)}${d.procedureEndedAt ? ` to ${formatTime(d.procedureEndedAt, tz)}` : ''}`);
  }
  idn('Operator', input.people.operator);
  idn('Referring clinician', d.referringName);

  const templateVersion = input.templateVersion ?? REPORT_TEMPLATE_VERSION;
  const interpretation: VesselInterpretation[] = [];
  const rows = new Map(study.vessels.map((v) => [v.id, v]));
  for (const r of analysis.vessels) {
    const row = rows.get(r.id);
    const sentences = vesselSentences(r, row, kind, afterPci, t, used, versionNumber(templateVersion) >= 3);
    if (sentences.length) interpretation.push({ vessel: vesselTitle(r.vessel, row?.segment), sentences });
  }

  const technique = techniqueSentences(study, t);
  if (study.vessels.some((v) => isNum(v.driftPdPa))) used.add('driftLow');

  const acetylcholine = acetylcholineSection(study, analysis, t, used);
  const quality = [...analysis.vessels.flatMap((v) => v.warnings.map((w) => w.message)), ...analysis.warnings.map((w) => w.message)];

  const signature = signatureView(input.signature ?? null, tz);
  const amendment: ReportView['amendment'] = input.amends
    ? {
        supersedes: `Supersedes version ${input.amends.versionNo}, signed ${formatDateTime(input.amends.signedAt, tz)} by ${input.amends.signedBy} (fingerprint ${shortFingerprint(input.amends.fingerprint)}).`,
        reason: signature?.amendmentReason ?? null,
        changes: recordChanges(input.amends.record, study as unknown as Record<string, unknown>).map(changeText),
      }
    : null;

  // "Angina" in the endotype's name only when the record says the patient has angina (COVADIS).
  const endotypeWords = endotypeName(analysis.endotype, d.anginaPresent ?? undefined, endotypeLabel);

  return {
    templateVersion,
    kind,
    title: kind === 'lesion' ? 'Coronary physiology report' : 'Coronary function testing report',
    hospital: input.hospital ?? null,
    patient: { name: `${p.familyName.toUpperCase()}, ${p.givenName}`, mrn: p.mrn, birthDate: p.birthDate, sex: vocabulary.sexLabel[p.sex] },
    identification,
    indication: {
      text: filled(d.indication) ? d.indication.trim() : null,
      question: d.clinicalQuestion ? vocabulary.clinicalQuestionLabel[d.clinicalQuestion] : null,
    },
    technique,
    measurements: measurementTable(study, analysis, t),
    indices: indexTable(analysis, study, t),
    interpretation,
    lesionSummary: kind === 'lesion' ? lesionSummary(study, analysis, afterPci, t) : [],
    acetylcholine,
    endotype:
      kind === 'coronary-function'
        ? {
            // Endothelial dysfunction is a finding: "no abnormality" is never printed above it.
            label:
              analysis.endotype === 'no-abnormality' && analysis.findings.endothelialDysfunction
                ? 'No obstructive disease, microvascular dysfunction or spasm; endothelial dysfunction'
                : endotypeWords,
            // The headline names every coexisting finding; it is left out when it only repeats the label.
            headline: sentence(analysis.headline) === sentence(endotypeWords) ? '' : sentence(analysis.headline),
            reasons: analysis.reasons.map(sentence),
          }
        : null,
    quality,
    complications: complicationLines(study.findings),
    impression: paragraphs(study.findings.impression),
    plan: paragraphs(study.findings.plan),
    thresholds: used.keys.map((k) => ({ ...thresholdText(k, t), source: thresholdSource(k, t) })),
    thresholdsBasis: templateVersion === 'v1' || !input.thresholdsBasis ? null : thresholdsBasisSentence(input.thresholdsBasis, tz),
    caution: reportCaution[kind],
    amendment,
    signature,
  };
}
