import { drugRoutes, hyperemicAgents } from '../physiology/drugs';

/**
 * Pick-list values of the study record, with the words the screens and the report use.
 * Stored values are stable kebab-case codes; labels may change.
 */
export const studyStates = ['draft', 'awaiting-signature', 'signed', 'amending', 'amended'] as const;
export type StudyState = (typeof studyStates)[number];
export const studyStateLabel: Record<StudyState, string> = {
  draft: 'Draft',
  'awaiting-signature': 'Awaiting signature',
  signed: 'Signed',
  amending: 'Addendum open',
  amended: 'Amended',
};

export const clinicalQuestions = ['intermediate-lesion', 'angina-no-obstruction', 'post-pci', 'other'] as const;
export const clinicalQuestionLabel: Record<(typeof clinicalQuestions)[number], string> = {
  'intermediate-lesion': 'Intermediate lesion: is it significant?',
  'angina-no-obstruction': 'Angina with no obstructive disease: coronary function testing',
  'post-pci': 'Result after coronary intervention',
  other: 'Other',
};

export const sexes = ['female', 'male', 'other', 'unknown'] as const;
export const sexLabel: Record<(typeof sexes)[number], string> = { female: 'Female', male: 'Male', other: 'Other', unknown: 'Unknown' };

export const accessSites = ['right-radial', 'left-radial', 'right-femoral', 'left-femoral', 'other'] as const;
export const accessSiteLabel: Record<(typeof accessSites)[number], string> = {
  'right-radial': 'Right radial',
  'left-radial': 'Left radial',
  'right-femoral': 'Right femoral',
  'left-femoral': 'Left femoral',
  other: 'Other',
};

export { drugRoutes, hyperemicAgents };
export const hyperemicAgentLabel: Record<(typeof hyperemicAgents)[number], string> = {
  adenosine: 'Adenosine',
  papaverine: 'Papaverine',
  other: 'Other',
  none: 'None (resting only)',
};
export const drugRouteLabel: Record<(typeof drugRoutes)[number], string> = { intravenous: 'Intravenous', intracoronary: 'Intracoronary' };
export const doseUnits = ['ug', 'ug/kg/min', 'mg'] as const;
export const doseUnitLabel: Record<(typeof doseUnits)[number], string> = { ug: 'µg', 'ug/kg/min': 'µg/kg/min', mg: 'mg' };

export const wirePositions = ['distal-third', 'mid-vessel', 'proximal', 'other'] as const;
export const wirePositionLabel: Record<(typeof wirePositions)[number], string> = {
  'distal-third': 'Distal third of the vessel',
  'mid-vessel': 'Mid vessel',
  proximal: 'Proximal',
  other: 'Other',
};

export const pullbackPatterns = ['focal', 'diffuse', 'tandem', 'not-done'] as const;
export const pullbackPatternLabel: Record<(typeof pullbackPatterns)[number], string> = {
  focal: 'Focal step-up',
  diffuse: 'Diffuse gradual loss',
  tandem: 'Tandem lesions',
  'not-done': 'Not done',
};

export const decisions = ['pci', 'defer', 'surgical-referral', 'medical-therapy'] as const;
export const decisionLabel: Record<(typeof decisions)[number], string> = {
  pci: 'Treat (coronary intervention)',
  defer: 'Defer',
  'surgical-referral': 'Surgical referral',
  'medical-therapy': 'Medical therapy',
};

/** Long vessel names (headings, the report); screens and tables use the trade's short names. */
export { vesselLongName as vesselLabel, vesselShortName } from '../physiology/vessels';

export const anginaCharacters = ['stable', 'unstable', 'rest', 'mixed'] as const;
export const anginaCharacterLabel: Record<(typeof anginaCharacters)[number], string> = {
  stable: 'Stable, on exertion',
  unstable: 'Unstable (new, worsening or prolonged at rest)',
  rest: 'At rest, not on exertion',
  mixed: 'Both on exertion and at rest',
};

export const rhythms = ['sinus', 'atrial-fibrillation', 'paced', 'other'] as const;
export const rhythmLabel: Record<(typeof rhythms)[number], string> = {
  sinus: 'Sinus rhythm',
  'atrial-fibrillation': 'Atrial fibrillation',
  paced: 'Paced',
  other: 'Other',
};

/** When nitroglycerin was given: before the measurements, or only after the acetylcholine test. */
export const nitrateTimings = ['before-measurements', 'after-acetylcholine'] as const;
export const nitrateTimingLabel: Record<(typeof nitrateTimings)[number], string> = {
  'before-measurements': 'Before the measurements',
  'after-acetylcholine': 'Only after the acetylcholine test',
};

export const spasmPatterns = ['focal', 'diffuse'] as const;
export const spasmPatternLabel: Record<(typeof spasmPatterns)[number], string> = {
  focal: 'Focal (one segment)',
  diffuse: 'Diffuse (two or more adjacent segments)',
};

export const timiFlowGrades = [0, 1, 2, 3] as const;
export const timiFlowLabel: Record<(typeof timiFlowGrades)[number], string> = {
  0: 'TIMI 0: no flow',
  1: 'TIMI 1: penetration without perfusion',
  2: 'TIMI 2: partial perfusion',
  3: 'TIMI 3: complete perfusion',
};

/** Complications of the procedure; "none" is recorded explicitly, never read from an empty list. */
export const complicationKinds = [
  'none',
  'dissection',
  'perforation',
  'no-reflow',
  'persistent-spasm',
  'arrhythmia',
  'hypotension',
  'access-site-bleeding',
  'contrast-reaction',
  'other',
] as const;
export type ComplicationKind = (typeof complicationKinds)[number];
export const complicationLabel: Record<ComplicationKind, string> = {
  none: 'None',
  dissection: 'Coronary dissection',
  perforation: 'Coronary perforation',
  'no-reflow': 'Slow or no reflow',
  'persistent-spasm': 'Spasm needing more nitroglycerin',
  arrhythmia: 'Arrhythmia needing treatment',
  hypotension: 'Hypotension needing treatment',
  'access-site-bleeding': 'Access-site bleeding or haematoma',
  'contrast-reaction': 'Contrast reaction',
  other: 'Other (describe below)',
};

/**
 * Coronary segments for invasive angiography, in the segment model derived from the CASS / AHA
 * classification (Austen et al., Circulation 1975) as used by the SYNTAX score (Sianos et al.,
 * EuroIntervention 2005). Stored as the code text ("12a").
 */
export const coronarySegments = [
  { code: '1', label: 'Proximal RCA', vessel: 'RCA' },
  { code: '2', label: 'Mid RCA', vessel: 'RCA' },
  { code: '3', label: 'Distal RCA', vessel: 'RCA' },
  { code: '4', label: 'Posterior descending (from the RCA)', vessel: 'PDA' },
  { code: '16', label: 'Posterolateral (from the RCA)', vessel: 'PLB' },
  { code: '16a', label: 'Posterolateral, first', vessel: 'PLB' },
  { code: '16b', label: 'Posterolateral, second', vessel: 'PLB' },
  { code: '16c', label: 'Posterolateral, third', vessel: 'PLB' },
  { code: '5', label: 'Left main', vessel: 'LM' },
  { code: '6', label: 'Proximal LAD', vessel: 'LAD' },
  { code: '7', label: 'Mid LAD', vessel: 'LAD' },
  { code: '8', label: 'Apical LAD', vessel: 'LAD' },
  { code: '9', label: 'First diagonal', vessel: 'DIAGONAL' },
  { code: '9a', label: 'First diagonal a', vessel: 'DIAGONAL' },
  { code: '10', label: 'Second diagonal', vessel: 'DIAGONAL' },
  { code: '10a', label: 'Second diagonal a', vessel: 'DIAGONAL' },
  { code: '11', label: 'Proximal circumflex', vessel: 'LCX' },
  { code: '12', label: 'Intermediate (ramus)', vessel: 'RAMUS' },
  { code: '12a', label: 'Obtuse marginal a', vessel: 'OBTUSE_MARGINAL' },
  { code: '12b', label: 'Obtuse marginal b', vessel: 'OBTUSE_MARGINAL' },
  { code: '13', label: 'Distal circumflex', vessel: 'LCX' },
  { code: '14', label: 'Left posterolateral', vessel: 'PLB' },
  { code: '14a', label: 'Left posterolateral a', vessel: 'PLB' },
  { code: '14b', label: 'Left posterolateral b', vessel: 'PLB' },
  { code: '15', label: 'Posterior descending (from the circumflex)', vessel: 'PDA' },
] as const;
export const segmentCodes = coronarySegments.map((s) => s.code) as unknown as readonly [string, ...string[]];
export const segmentModelName = 'angiographic segments (CASS / SYNTAX)';
