import { isCertainlyValid } from './fastpath';
import { physiologyInputSchema, type PhysiologyInput } from './schema';
import { analyzeValidated } from './study';
import type { PhysiologyResult } from './types';

export { physiologyInputSchema, vesselCodes, nhprKinds } from './schema';
export type { PhysiologyInput, PhysiologyOutput, VesselCode, NhprKind, VesselInput, DoseInput, ProcedureInput } from './schema';
export { hyperemicAgents, drugRoutes } from './schema';
export { vesselShortName, vesselLongName, rightCoronaryVessels } from './vessels';
export { driftOutOfRange, driftText } from './quality';
export { stenosisText } from './endotype';
export { constrictionText } from './vasoreactivity';
export {
  flagLabel,
  indexLabel,
  nhprKindLabel,
  imrMethodLabel,
  vasoreactivityLabel,
  endotypeLabel,
  endotypeLabelWithoutAngina,
  endotypeName,
  microvascularLabel,
} from './labels';
export { roundForDisplay, formatQuantity, formatWithUnit, formatAgreeing, displayDecimals, displayUnit, type QuantityKind } from './precision';
export {
  defaultThresholds,
  thresholdSources,
  thresholdCitations,
  thresholdsSchema,
  resolveThresholds,
} from './thresholds';
export type { Thresholds, ThresholdKey } from './thresholds';
export type {
  Flag,
  PhysiologyResult,
  VesselResult,
  VasoreactivityResult,
  DoseResult,
  VasoreactivityOutcome,
  PhysiologyWarning,
  Findings,
  Endotype,
  ImrMethod,
} from './types';
export { classifyDose } from './vasoreactivity';

/**
 * Analyse a physiology study: per-vessel indices, flags and quality warnings; the acetylcholine
 * result; study findings and endotype, with one reason sentence per rule that fired.
 * Throws the `ZodError` from `physiologyInputSchema.parse` on bad input.
 */
export function analyzeStudy(input: PhysiologyInput): PhysiologyResult {
  // Well-formed input skips the schema's copying parse; anything else is decided by the schema.
  const data = isCertainlyValid(input) ? input : physiologyInputSchema.parse(input);
  return analyzeValidated(data);
}
