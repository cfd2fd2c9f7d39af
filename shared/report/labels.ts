import type { Endotype, Flag, ImrMethod, VasoreactivityOutcome } from '../physiology';

/**
 * Words for the physiology core's codes, as the report and the screens print them. The codes are
 * stable; these words may change (a new report template version records the change).
 */

export const endotypeLabel: Readonly<Record<Endotype, string>> = Object.freeze({
  obstructive: 'Obstructive coronary disease',
  'microvascular-angina': 'Microvascular angina',
  'vasospastic-angina': 'Vasospastic angina',
  mixed: 'Microvascular and vasospastic angina',
  'no-abnormality': 'No coronary abnormality found',
  inconclusive: 'Not enough data for an endotype',
});

export const flagLabel: Readonly<Record<Flag, string>> = Object.freeze({
  normal: 'normal',
  abnormal: 'abnormal',
  borderline: 'borderline',
});

/** The resting-ratio names are the same on screen and in the report: one table. */
export { nhprKindLabel } from '../physiology/labels';

export const imrMethodLabel: Readonly<Record<ImrMethod, string>> = Object.freeze({
  'pd-tmn': 'Pd × Tmn',
  wedge: 'wedge-corrected',
  yong: 'corrected without wedge pressure',
});

export const vasoreactivityOutcomeLabel: Readonly<Record<VasoreactivityOutcome, string>> = Object.freeze({
  'epicardial-spasm': 'Epicardial spasm',
  'microvascular-spasm': 'Microvascular spasm',
  'endothelial-dysfunction': 'Endothelial dysfunction (constriction without spasm)',
  equivocal: 'Equivocal (criteria for spasm only partly met)',
  negative: 'Negative',
});

/** The standing caution printed with every report, in the words of its kind. */
export const reportCaution = Object.freeze({
  lesion: "Decision support only. The computed indices and their flags are for review by a licensed clinician; the thresholds are the lab's settings. Local policy applies.",
  'coronary-function':
    "Decision support only. The computed indices, their flags and the endotype are for review by a licensed clinician; the thresholds are the lab's settings. Local policy applies.",
} as const);
