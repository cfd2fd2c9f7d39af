import { above, atOrAbove } from './compare';
import { cutPlain, vesselName } from './format';
import type { DoseInput } from './schema';
import { cite, type Thresholds } from './thresholds';
import type { DoseResult, PhysiologyWarning, VasoreactivityOutcome } from './types';

/** The study's outcome, each dose's, and the warnings about the doses. */
export interface VasoreactivityAnalysis {
  result: VasoreactivityOutcome;
  doses: DoseResult[];
  warnings: PhysiologyWarning[];
}

const severity: Record<VasoreactivityOutcome, number> = {
  negative: 0,
  'endothelial-dysfunction': 1,
  equivocal: 2,
  'microvascular-spasm': 3,
  'epicardial-spasm': 4,
};

/** COVADIS classification of one acetylcholine dose. */
export function classifyDose(d: DoseInput, t: Thresholds): VasoreactivityOutcome {
  const severe = atOrAbove(d.constrictionPct, t.spasmConstrictionPct);
  const both = d.symptoms && d.ischemicEcg;
  if (severe && both) return 'epicardial-spasm';
  if (both) return 'microvascular-spasm';
  if (severe || atOrAbove(d.constrictionPct, t.endothelialDysfunctionPct)) return 'endothelial-dysfunction';
  return 'negative';
}

function doseName(d: DoseInput): string {
  return `${cutPlain(d.micrograms)} µg into the ${vesselName(d.vessel)}`;
}

/** Classify every dose; the study result is the most severe. `reasons` receives one sentence. */
export function analyzeVasoreactivity(
  doses: readonly DoseInput[],
  t: Thresholds,
  reasons: string[],
): VasoreactivityAnalysis {
  const warnings: PhysiologyWarning[] = [];
  const out: DoseResult[] = [];
  let worst: VasoreactivityOutcome = 'negative';
  let worstIdx = -1;
  let maxPct = 0;
  for (let i = 0; i < doses.length; i++) {
    const d = doses[i];
    const outcome = classifyDose(d, t);
    out.push({ vessel: d.vessel, micrograms: d.micrograms, result: outcome });
    if (worstIdx < 0 || severity[outcome] > severity[worst]) {
      worst = outcome;
      worstIdx = i;
    }
    if (d.constrictionPct > maxPct) maxPct = d.constrictionPct;
    if (above(d.micrograms, t.achMaxMicrograms)) {
      warnings.push({
        code: 'ach-dose-high',
        message: `Acetylcholine dose ${i + 1} (${doseName(d)}) is above the usual maximum of ${cutPlain(t.achMaxMicrograms)} µg (${cite(t, 'achMaxMicrograms')}); accepted — check the entry.`,
      });
    }
    if (outcome === 'endothelial-dysfunction' && atOrAbove(d.constrictionPct, t.spasmConstrictionPct)) {
      const missing = !d.symptoms && !d.ischemicEcg ? 'symptoms and ischaemic ECG changes' : !d.symptoms ? 'reproduction of symptoms' : 'ischaemic ECG changes';
      warnings.push({
        code: 'spasm-criteria-not-met',
        message: `Acetylcholine dose ${i + 1} (${doseName(d)}): ${cutPlain(d.constrictionPct)}% constriction without ${missing} does not meet the COVADIS criteria for epicardial spasm; classed as endothelial dysfunction.`,
      });
    }
  }

  const d = doses[worstIdx];
  const src = cite(t, 'spasmConstrictionPct');
  const spasmPct = cutPlain(t.spasmConstrictionPct);
  switch (worst) {
    case 'epicardial-spasm':
      reasons.push(
        `Acetylcholine ${doseName(d)}: ${cutPlain(d.constrictionPct)}% constriction with reproduced symptoms and ischaemic ECG changes meets the ≥ ${spasmPct}% criterion for epicardial spasm (${src}).`,
      );
      break;
    case 'microvascular-spasm':
      reasons.push(
        `Acetylcholine ${doseName(d)}: reproduced symptoms and ischaemic ECG changes with ${cutPlain(d.constrictionPct)}% constriction (below ${spasmPct}%) — microvascular spasm (${src}).`,
      );
      break;
    case 'endothelial-dysfunction':
      reasons.push(
        `Acetylcholine ${doseName(d)}: ${cutPlain(d.constrictionPct)}% constriction without the criteria for spasm is at or above ${cutPlain(t.endothelialDysfunctionPct)}% (${cite(t, 'endothelialDysfunctionPct')}) — endothelial dysfunction, not spasm (${src}).`,
      );
      break;
    default:
      reasons.push(
        `Acetylcholine testing was negative: maximum constriction ${cutPlain(maxPct)}% (below ${cutPlain(t.endothelialDysfunctionPct)}%, ${cite(t, 'endothelialDysfunctionPct')}) and no dose reproduced symptoms together with ischaemic ECG changes (${src}).`,
      );
  }
  return { result: worst, doses: out, warnings };
}
