import type { Flag, VasoreactivityOutcome } from '../physiology';

/**
 * Words the report prints inside its sentences where the screens' table would not read well: flags
 * in lower case, and the acetylcholine outcome with what it means. Everything else comes from the one
 * table in `shared/physiology/labels.ts`. The codes are stable; signed versions keep their words.
 */

export const flagLabel: Readonly<Record<Flag, string>> = Object.freeze({
  normal: 'normal',
  abnormal: 'abnormal',
  borderline: 'borderline',
});

/** Endotype, IMR method and resting-ratio names are the same on screen, in the report and in the FHIR bundle: one table. */
export { endotypeLabel, imrMethodLabel, nhprKindLabel } from '../physiology/labels';

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
