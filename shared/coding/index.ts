export { suggestCodes, rules, ruleById, CODING_CAUTION } from './suggest';
export {
  codingInputSchema,
  cathSchema,
  pciSchema,
  physiologyEntrySchema,
  diagnosesSchema,
  billingContexts,
  settings,
  patientClasses,
  interventionKinds,
  stentTypes,
  measuredIndices,
  provocationAgents,
  codeSystems,
} from './schema';
export type {
  CodingInput,
  CodingData,
  CodingResult,
  CodingWarning,
  SuggestedCode,
  CodeSetChoice,
  CodeSystem,
  BillingContext,
  Setting,
  PatientClass,
  InterventionKind,
  StentType,
  MeasuredIndex,
  PciEntry,
  PhysiologyEntry,
} from './schema';
export { codeTable, codeEntry, physiologyPrimaryCodes, pciAddOnPrimaries, type CodeEntry } from './codes';
export { encodedReleases, chooseCodeSets, releaseOf, releaseLabel, releaseSpan } from './code-sets';
export { checkCodeFormat, checkCodeLine, type FormatProblem } from './format';
export type { Rule } from './rules/rule';
export { anatomyOf, arteryModifier, majorArteries, type MajorArtery } from './vessels';
export { studyCodingSchema, emptyStudyCoding, toCodingInput, dayOfService, type StudyCoding } from './from-study';
