import { contextFor } from './context';
import { classifyStudy } from './endotype';
import { vesselName } from './format';
import { analyzeVessel } from './indices';
import type { PhysiologyOutput, VesselCode } from './schema';
import type { DoseResult, PhysiologyResult, PhysiologyWarning, VasoreactivityResult, VesselResult } from './types';
import { analyzeVasoreactivity } from './vasoreactivity';

/** The analysis of an input that has already passed validation. */
export function analyzeValidated(data: PhysiologyOutput): PhysiologyResult {
  const ctx = contextFor(data.thresholds);
  const t = ctx.t;
  const vin = data.vessels;
  const n = vin.length;

  // Name vessels by code; add the caller's id when a code occurs more than once.
  const counts = new Map<VesselCode, number>();
  for (let i = 0; i < n; i++) counts.set(vin[i].vessel, (counts.get(vin[i].vessel) ?? 0) + 1);
  const labels: string[] = [];
  const vessels: VesselResult[] = [];
  for (let i = 0; i < n; i++) {
    const v = vin[i];
    const name = vesselName(v.vessel);
    const label = counts.get(v.vessel) === 1 ? name : `${name} (${v.id})`;
    labels.push(label);
    vessels.push(analyzeVessel(v, t, label, data.procedure));
  }

  const vasoReasons: string[] = [];
  let vasoreactivity: VasoreactivityResult | undefined;
  let doseResults: DoseResult[] | undefined;
  let warnings: PhysiologyWarning[] = [];
  const doses = data.vasoreactivity?.doses;
  if (doses !== undefined && doses.length > 0) {
    const analysed = analyzeVasoreactivity(doses, t, vasoReasons, data.procedure);
    vasoreactivity = { result: analysed.result };
    doseResults = analysed.doses;
    warnings = analysed.warnings;
  }

  const { findings, endotype, headline, reasons } = classifyStudy(vessels, labels, vasoreactivity, vasoReasons, ctx);
  const result: PhysiologyResult = { vessels, findings, endotype, headline, reasons, warnings };
  if (vasoreactivity !== undefined) {
    result.vasoreactivity = vasoreactivity;
    result.doseResults = doseResults;
  }
  return result;
}
