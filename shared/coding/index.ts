export { suggestCodes, rules, ruleById, CODING_CAUTION } from './suggest';
export { codingInputSchema, interventionKinds, measuredIndices, codeSystems } from './schema';
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
export { encodedReleases, chooseCodeSets, releaseOf } from './code-sets';
export { checkCodeFormat, checkCodeLine, type FormatProblem } from './format';
export type { Rule } from './rules/rule';
export { studyCodingSchema, emptyStudyCoding, toCodingInput, type StudyCoding } from './from-study';
