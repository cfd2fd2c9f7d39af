import type { NhprKind } from './schema';
import type { Endotype, Findings, Flag, ImrMethod, VasoreactivityOutcome } from './types';

/**
 * The words people read for the core's codes: one table, used by the screens, the report and the
 * messages, so a flag or an index is called the same everywhere.
 */
export const flagLabel: Readonly<Record<Flag, string>> = Object.freeze({
  normal: 'Normal',
  borderline: 'Borderline',
  abnormal: 'Abnormal',
});

/** Index names as the trade writes them. */
export const indexLabel = Object.freeze({
  ffr: 'FFR',
  restingPdPa: 'Resting Pd/Pa',
  nhpr: 'Resting ratio',
  cfr: 'CFR',
  imr: 'IMR',
  rrr: 'RRR',
  mrr: 'MRR',
  drift: 'Drift Pd/Pa',
  tmnRest: 'Tmn at rest',
  tmnHyperemia: 'Tmn at hyperaemia',
} as const);

export const nhprKindLabel: Readonly<Record<NhprKind, string>> = Object.freeze({
  'whole-cycle': 'Whole-cycle Pd/Pa',
  diastolic: 'Diastolic ratio',
  'full-cycle-minimum': 'Full-cycle minimum ratio',
});

export const imrMethodLabel: Readonly<Record<ImrMethod, string>> = Object.freeze({
  'pd-tmn': 'Pd × Tmn',
  wedge: 'wedge-corrected',
  yong: 'corrected without wedge pressure',
});

export const vasoreactivityLabel: Readonly<Record<VasoreactivityOutcome, string>> = Object.freeze({
  'epicardial-spasm': 'Epicardial spasm',
  'microvascular-spasm': 'Microvascular spasm',
  'endothelial-dysfunction': 'Endothelial dysfunction',
  equivocal: 'Equivocal',
  negative: 'Negative',
});

export const endotypeLabel: Readonly<Record<Endotype, string>> = Object.freeze({
  obstructive: 'Obstructive coronary disease',
  'microvascular-angina': 'Microvascular angina',
  'vasospastic-angina': 'Vasospastic angina',
  mixed: 'Microvascular and vasospastic angina',
  'no-abnormality': 'No coronary abnormality found',
  inconclusive: 'Endotype not determined',
});

/**
 * The endotypes whose names say "angina": COVADIS calls them angina only in a patient with the symptom
 * (microvascular angina: Ong et al., Int J Cardiol 2018; vasospastic angina: Beltrame et al., Eur Heart J
 * 2017). When the record says no angina, or does not say, the finding is named instead.
 */
export const endotypeLabelWithoutAngina: Readonly<Partial<Record<Endotype, string>>> = Object.freeze({
  'microvascular-angina': 'Coronary microvascular dysfunction',
  'vasospastic-angina': 'Epicardial vasospasm',
  mixed: 'Coronary microvascular dysfunction and epicardial vasospasm',
});

/** The endotype's name for this patient: "angina" only when angina is recorded as present. */
export function endotypeName(endotype: Endotype, angina: boolean | undefined, labels: Readonly<Record<Endotype, string>> = endotypeLabel): string {
  return angina === true ? labels[endotype] : (endotypeLabelWithoutAngina[endotype] ?? labels[endotype]);
}

export const microvascularLabel: Readonly<Record<NonNullable<Findings['microvascular']>, string>> = Object.freeze({
  structural: 'Structural microvascular dysfunction',
  functional: 'Functional microvascular dysfunction',
  'raised-imr': 'Raised microvascular resistance, CFR not low',
});

