import { contextFor } from './context';
import { classifyStudy } from './endotype';
import { vesselName } from './format';
import { analyzeVessel } from './indices';
import type { PhysiologyOutput, VesselCode } from './schema';
import type { DoseResult, PhysiologyResult, PhysiologyWarning, VasoreactivityResult, VesselResult } from './types';
import { rightCoronaryVessels } from './vessels';
import { analyzeVasoreactivity } from './vasoreactivity';

/** The analysis of an input that has already passed validation. */
/** Doses from which a negative acetylcholine test counts (ESC 2024 protocol: 100–200 µg left, 20–50 µg right). */
const PROVOCATIVE_LEFT_UG = 100;
const PROVOCATIVE_RIGHT_UG = 50;

export function analyzeValidated(data: PhysiologyOutput): PhysiologyResult {
  const ctx = contextFor(data.thresholds);
  const t = ctx.t;
  const vin = data.vessels;
  const n = vin.length;

  // Name vessels by code; when a code occurs more than once, number its rows ("LAD, lesion 2") — or
  // use the caller's id when it is a short readable one: a generated row id means nothing in a report.
  const counts = new Map<VesselCode, number>();
  for (let i = 0; i < n; i++) counts.set(vin[i].vessel, (counts.get(vin[i].vessel) ?? 0) + 1);
  const seen = new Map<VesselCode, number>();
  const labels: string[] = [];
  const vessels: VesselResult[] = [];
  for (let i = 0; i < n; i++) {
    const v = vin[i];
    const name = vesselName(v.vessel);
    const nth = (seen.get(v.vessel) ?? 0) + 1;
    seen.set(v.vessel, nth);
    const readableId = /^[\p{L}\p{N} .\-/]{1,16}$/u.test(v.id) && !/^[0-9a-f]{8}-/i.test(v.id);
    const label = counts.get(v.vessel) === 1 ? name : readableId ? `${name} (${v.id})` : `${name}, lesion ${nth}`;
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

  const classified = classifyStudy(vessels, labels, vasoreactivity, vasoReasons, ctx, data.angina);
  const { findings, reasons } = classified;
  let { endotype, headline } = classified;
  // A test that may be falsely negative does not support "no abnormality" (ESC 2024): nitrates given
  // before acetylcholine (or at a time not recorded), no dose reached the provocative range (100 µg
  // left, 50 µg right), or only the right coronary artery was tested. Only a test without spasm is in doubt: endothelial dysfunction stays a finding,
  // but spasm is not excluded beside it. A spasm provoked despite nitrates stands.
  if ((endotype === 'no-abnormality' || classified.normalButEndothelial) && doses !== undefined && doses.length > 0 && vasoreactivity !== undefined) {
    const doubts: string[] = [];
    if (warnings.some((w) => w.code === 'nitrates-before-acetylcholine')) doubts.push('nitroglycerin was given before acetylcholine');
    if (warnings.some((w) => w.code === 'nitrate-timing-unknown')) doubts.push('nitrates were given and their timing is not recorded');
    const provocative = doses.some((d) => d.micrograms >= (rightCoronaryVessels.has(d.vessel) ? PROVOCATIVE_RIGHT_UG : PROVOCATIVE_LEFT_UG));
    if (!provocative) doubts.push(`no dose reached the provocative range (${PROVOCATIVE_LEFT_UG} µg left, ${PROVOCATIVE_RIGHT_UG} µg right coronary)`);
    // The left coronary artery is the one tested first and in full; a test of the right alone leaves
    // the left system, where CFR and IMR are usually measured, unprovoked (common practice).
    if (doses.every((d) => rightCoronaryVessels.has(d.vessel))) doubts.push('acetylcholine was given into the right coronary artery only, so the left coronary system was not provoked');
    if (doubts.length > 0) {
      endotype = 'inconclusive';
      if (vasoreactivity.result === 'endothelial-dysfunction') {
        headline = `Endothelial dysfunction on acetylcholine testing; endotype not determined: spasm may have been masked or not provoked (${doubts.join('; ')})`;
        reasons[reasons.length - 1] = `Endotype: inconclusive — endothelial dysfunction was found on acetylcholine testing and stands, but spasm cannot be excluded: ${doubts.join('; ')} (ESC 2024).`;
      } else {
        headline = `Endotype not determined: the acetylcholine test may be falsely negative (${doubts.join('; ')})`;
        reasons[reasons.length - 1] = `Endotype: inconclusive — no abnormality was found, but the acetylcholine test may be falsely negative: ${doubts.join('; ')} (ESC 2024).`;
      }
    }
  }
  const result: PhysiologyResult = { vessels, findings, endotype, headline, reasons, warnings };
  if (vasoreactivity !== undefined) {
    result.vasoreactivity = vasoreactivity;
    result.doseResults = doseResults;
  }
  return result;
}
