import type { PathStep } from './merge';

/** Words for a field of the study record, as a person reads them in a merge choice. */
const words: Record<string, string> = {
  patient: 'Patient',
  details: 'Procedure',
  setup: 'Setup',
  vessels: 'Vessels',
  vasoreactivity: 'Acetylcholine test',
  doses: 'Dose',
  findings: 'Findings',
  mrn: 'MRN',
  familyName: 'Family name',
  givenName: 'Given name',
  birthDate: 'Birth date',
  sex: 'Sex',
  encounter: 'Encounter',
  procedureStartedAt: 'Procedure start',
  procedureEndedAt: 'Procedure end',
  operatorId: 'Operator',
  referringName: 'Referring clinician',
  referringEmail: 'Referring clinician e-mail',
  indication: 'Indication',
  clinicalQuestion: 'Clinical question',
  accessSite: 'Access site',
  guideFrench: 'Guide catheter size',
  transducerZeroed: 'Transducer zeroed',
  nitratesGiven: 'Nitrates before wiring',
  nitrateDoseMicrograms: 'Nitrate dose',
  equalizedInAorta: 'Pressures equalized in the aorta',
  introducerRemoved: 'Introducer removed',
  wirePosition: 'Wire position',
  hyperemicAgent: 'Hyperaemic agent',
  hyperemicRoute: 'Hyperaemic route',
  hyperemicDose: 'Hyperaemic dose',
  hyperemicDoseUnit: 'Hyperaemic dose unit',
  heparinUnits: 'Heparin',
  segment: 'Segment',
  visualStenosisPct: 'Visual stenosis',
  restPa: 'Pa at rest',
  restPd: 'Pd at rest',
  hyperemiaPa: 'Pa at hyperaemia',
  hyperemiaPd: 'Pd at hyperaemia',
  consoleFfr: 'FFR from the console',
  nhprKind: 'Resting ratio kind',
  nhprValue: 'Resting ratio value',
  wedgePressure: 'Coronary wedge pressure',
  driftPdPa: 'Drift check',
  restTransit: 'Transit times at rest',
  hyperemiaTransit: 'Transit times at hyperaemia',
  pullbackPattern: 'Pull-back pattern',
  decision: 'Decision',
  micrograms: 'Acetylcholine dose',
  constrictionPct: 'Diameter reduction',
  symptoms: 'Usual symptoms reproduced',
  ischemicEcg: 'Ischaemic ECG changes',
  nitrateReversal: 'Spasm reversed with nitrates',
  complications: 'Complications',
  contrastMl: 'Contrast',
  fluoroscopyMinutes: 'Fluoroscopy time',
  impression: 'Impression',
  plan: 'Plan',
};

const humanize = (key: string) => words[key] ?? key.replace(/([A-Z])/g, ' $1').replace(/^./, (c) => c.toUpperCase());

/** "Vessels › LAD › Pa at rest": the section, the row (by its vessel), the field. */
export function fieldLabel(path: PathStep[], row?: Record<string, unknown>): string {
  return path
    .map((step) => (typeof step === 'string' ? humanize(step) : typeof row?.vessel === 'string' ? `${row.vessel}${typeof row.micrograms === 'number' ? ` ${row.micrograms} µg` : ''}` : 'row'))
    .filter((w) => w !== 'Dose')
    .join(' › ');
}

/** A field's value as text in a merge choice. */
export function valueText(v: unknown): string {
  if (v === undefined) return 'removed';
  if (v === null || v === '' || (Array.isArray(v) && v.length === 0)) return 'empty';
  if (typeof v === 'boolean') return v ? 'Yes' : 'No';
  if (typeof v === 'number') return Number.isNaN(v) ? 'not a number' : String(v);
  if (Array.isArray(v)) return v.map(valueText).join(', ');
  if (typeof v === 'object') return 'kept, with changes';
  return String(v);
}
