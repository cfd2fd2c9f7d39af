/**
 * Pick-list values of the study record, with the words the screens and the report use.
 * Stored values are stable kebab-case codes; labels may change.
 */
export const studyStates = ['draft', 'awaiting-signature', 'signed', 'amended'] as const;
export type StudyState = (typeof studyStates)[number];
export const studyStateLabel: Record<StudyState, string> = {
  draft: 'Draft',
  'awaiting-signature': 'Awaiting signature',
  signed: 'Signed',
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

export const hyperemicAgents = ['adenosine', 'papaverine', 'none'] as const;
export const hyperemicAgentLabel: Record<(typeof hyperemicAgents)[number], string> = { adenosine: 'Adenosine', papaverine: 'Papaverine', none: 'None (resting only)' };
export const drugRoutes = ['intravenous', 'intracoronary'] as const;
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

export const vesselLabel = {
  LM: 'Left main',
  LAD: 'Left anterior descending',
  LCX: 'Circumflex',
  RCA: 'Right coronary',
  RAMUS: 'Ramus intermedius',
  DIAGONAL: 'Diagonal',
  OBTUSE_MARGINAL: 'Obtuse marginal',
  PDA: 'Posterior descending',
  PLB: 'Posterolateral branch',
  GRAFT: 'Bypass graft',
} as const;

/**
 * Coronary segments, numbered as in the 18-segment model of the SCCT guidelines for coronary CT
 * angiography (Leipsic et al., J Cardiovasc Comput Tomogr 2014), from memory.
 */
export const coronarySegments = [
  { n: 1, label: 'Proximal RCA', vessel: 'RCA' },
  { n: 2, label: 'Mid RCA', vessel: 'RCA' },
  { n: 3, label: 'Distal RCA', vessel: 'RCA' },
  { n: 4, label: 'R-PDA', vessel: 'PDA' },
  { n: 5, label: 'Left main', vessel: 'LM' },
  { n: 6, label: 'Proximal LAD', vessel: 'LAD' },
  { n: 7, label: 'Mid LAD', vessel: 'LAD' },
  { n: 8, label: 'Distal LAD', vessel: 'LAD' },
  { n: 9, label: 'D1', vessel: 'DIAGONAL' },
  { n: 10, label: 'D2', vessel: 'DIAGONAL' },
  { n: 11, label: 'Proximal LCx', vessel: 'LCX' },
  { n: 12, label: 'OM1', vessel: 'OBTUSE_MARGINAL' },
  { n: 13, label: 'Mid and distal LCx', vessel: 'LCX' },
  { n: 14, label: 'OM2', vessel: 'OBTUSE_MARGINAL' },
  { n: 15, label: 'L-PDA', vessel: 'PDA' },
  { n: 16, label: 'R-PLB', vessel: 'PLB' },
  { n: 17, label: 'Ramus intermedius', vessel: 'RAMUS' },
  { n: 18, label: 'L-PLB', vessel: 'PLB' },
] as const;
export const segmentModelName = 'SCCT 18-segment model';
