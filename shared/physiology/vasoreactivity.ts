import { above, atOrAbove, below } from './compare';
import { cutPlain } from './format';
import { formatAgreeing } from './precision';
import type { DoseInput, ProcedureInput } from './schema';
import { cite, type Thresholds } from './thresholds';
import type { DoseResult, PhysiologyWarning, VasoreactivityOutcome } from './types';
import { rightCoronaryVessels, vesselShortName } from './vessels';

/** The study's outcome, each dose's, and the warnings about the doses. */
export interface VasoreactivityAnalysis {
  result: VasoreactivityOutcome;
  doses: DoseResult[];
  warnings: PhysiologyWarning[];
}

/** The study's result is its most severe dose; a suspected (equivocal) spasm outranks endothelial dysfunction. */
const severity: Record<VasoreactivityOutcome, number> = {
  negative: 0,
  'endothelial-dysfunction': 1,
  equivocal: 2,
  'microvascular-spasm': 3,
  'epicardial-spasm': 4,
};

/**
 * COVADIS classification of one acetylcholine dose (Beltrame et al., EHJ 2017; Ong et al., IJC 2018):
 *
 * | constriction            | symptoms + ischaemic ECG | one of the two | neither                 |
 * |-------------------------|--------------------------|----------------|-------------------------|
 * | ≥ spasm cut-off (90%)   | epicardial spasm         | equivocal      | equivocal               |
 * | ≥ endothelial (20%)     | microvascular spasm      | equivocal      | endothelial dysfunction |
 * | below                   | microvascular spasm      | equivocal      | negative                |
 */
export function classifyDose(d: DoseInput, t: Thresholds): VasoreactivityOutcome {
  const severe = atOrAbove(d.constrictionPct, t.spasmConstrictionPct, 'raw');
  const both = d.symptoms && d.ischemicEcg;
  const one = d.symptoms !== d.ischemicEcg;
  if (both) return severe ? 'epicardial-spasm' : 'microvascular-spasm';
  if (one || severe) return 'equivocal';
  return atOrAbove(d.constrictionPct, t.endothelialDysfunctionPct, 'raw') ? 'endothelial-dysfunction' : 'negative';
}

/** The band of the COVADIS table a constriction falls in, judged as entered. */
export function constrictionBand(pct: number, t: Pick<Thresholds, 'spasmConstrictionPct' | 'endothelialDysfunctionPct'>): 0 | 1 | 2 {
  return atOrAbove(pct, t.spasmConstrictionPct, 'raw') ? 2 : atOrAbove(pct, t.endothelialDysfunctionPct, 'raw') ? 1 : 0;
}

/** A constriction as text in the same band as the value judged: 89.6% prints "89.6", never "90". */
export function constrictionText(pct: number, t: Pick<Thresholds, 'spasmConstrictionPct' | 'endothelialDysfunctionPct'>): string {
  return formatAgreeing(pct, 'percent', (x) => constrictionBand(x, t));
}

/** One artery whose acetylcholine doses stopped below the protocol's last dose. */
export interface ProtocolShortfall {
  /** Left coronary (LM, LAD, LCX and branches) or right coronary (RCA, PDA, PLB). */
  side: 'left' | 'right';
  /** The highest dose given into that artery (µg). */
  highest: number;
  /** The protocol's last dose for that artery (µg): the lab's acetylcholine maximum for it. */
  last: number;
}

/**
 * Each artery whose highest acetylcholine dose is below the protocol's last dose for it: 200 µg into
 * the left coronary (ESC 2024 protocol: 2, 20, 100, 200 µg), 50 µg into the right (Japanese
 * Circulation Society 2016: 20, 50 µg), or the lab's settings. Doses without an amount are skipped.
 */
export function protocolShortfalls(
  doses: ReadonlyArray<{ vessel: DoseInput['vessel']; micrograms: number | null | undefined }>,
  t: Pick<Thresholds, 'achMaxMicrograms' | 'achMaxMicrogramsRight'>,
): ProtocolShortfall[] {
  const out: ProtocolShortfall[] = [];
  for (const side of ['left', 'right'] as const) {
    const given = doses
      .filter((d) => rightCoronaryVessels.has(d.vessel) === (side === 'right'))
      .map((d) => d.micrograms)
      .filter((m): m is number => typeof m === 'number' && Number.isFinite(m));
    if (given.length === 0) continue;
    const highest = Math.max(...given);
    const last = side === 'right' ? t.achMaxMicrogramsRight : t.achMaxMicrograms;
    if (below(highest, last, 'raw')) out.push({ side, highest, last });
  }
  return out;
}

/**
 * "up to 100 µg; 200 µg not given (incomplete protocol)", one clause per artery short of its last dose;
 * the artery is named when doses went into both. Empty when every artery reached its last dose.
 */
export function shortfallText(shortfalls: readonly ProtocolShortfall[], bothSides: boolean): string {
  return shortfalls
    .map((s) => `${bothSides ? `into the ${s.side} coronary ` : ''}up to ${cutPlain(s.highest)} µg; ${cutPlain(s.last)} µg not given (incomplete protocol)`)
    .join('; ');
}

function doseName(d: DoseInput): string {
  return `${cutPlain(d.micrograms)} µg into the ${vesselShortName[d.vessel]}`;
}

function criteriaSeen(d: DoseInput): string {
  if (d.symptoms && !d.ischemicEcg) return 'reproduced symptoms without ischaemic ECG changes';
  if (!d.symptoms && d.ischemicEcg) return 'ischaemic ECG changes without reproduced symptoms';
  return 'neither reproduced symptoms nor ischaemic ECG changes';
}

/** Classify every dose; the study result is the most severe. `reasons` receives one sentence. */
export function analyzeVasoreactivity(
  doses: readonly DoseInput[],
  t: Thresholds,
  reasons: string[],
  procedure?: ProcedureInput,
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
    const right = rightCoronaryVessels.has(d.vessel);
    const ceiling = right ? t.achMaxMicrogramsRight : t.achMaxMicrograms;
    if (above(d.micrograms, ceiling, 'raw')) {
      // Printed with the decimals that keep it above the ceiling (200.4 µg is not "200 µg").
      const high = `${formatAgreeing(d.micrograms, 'dose', (x) => above(x, ceiling, 'raw'))} µg into the ${vesselShortName[d.vessel]}`;
      warnings.push({
        code: 'ach-dose-high',
        message: right
          ? `Acetylcholine dose ${i + 1} (${high}) is above the usual ceiling of ${cutPlain(ceiling)} µg for the right coronary (${cite(t, 'achMaxMicrogramsRight')}; ESC 2024 warns of bradycardia); accepted — check the entry.`
          : `Acetylcholine dose ${i + 1} (${high}) is above the usual maximum of ${cutPlain(ceiling)} µg (${cite(t, 'achMaxMicrograms')}); accepted — check the entry.`,
      });
    }
    if (outcome === 'equivocal') {
      warnings.push({
        code: 'spasm-criteria-not-met',
        message: `Acetylcholine dose ${i + 1} (${doseName(d)}): ${constrictionText(d.constrictionPct, t)}% constriction with ${criteriaSeen(d)} meets only part of the COVADIS criteria for spasm — equivocal (suspected, not proven).`,
      });
    }
  }
  // Nitrates relieve spasm: they can hide a spasm, never create one, so a spasm seen after them stands.
  const spasmSeen = worst === 'epicardial-spasm' || worst === 'microvascular-spasm';
  const protocol = '(ESC 2024 protocol: nitroglycerin after acetylcholine, nitrates stopped 24 h before)';
  if (procedure?.nitratesBeforeAcetylcholine === true && doses.length > 0) {
    warnings.push({
      code: 'nitrates-before-acetylcholine',
      message: spasmSeen
        ? `Nitrates were given before the acetylcholine test; they relieve spasm, yet spasm was provoked, so the positive result stands ${protocol}.`
        : `Nitrates were given before the acetylcholine test; they relieve spasm and can make the test falsely negative — spasm may have been masked ${protocol}.`,
    });
  }
  if (procedure?.nitratesBeforeAcetylcholine === 'unknown' && doses.length > 0 && !spasmSeen) {
    warnings.push({
      code: 'nitrate-timing-unknown',
      message: `Nitrates were given, but when is not recorded; if before the acetylcholine test, they may have masked spasm and the test may be falsely negative — record the timing ${protocol}.`,
    });
  }

  const d = doses[worstIdx];
  const src = cite(t, 'spasmConstrictionPct');
  const spasmPct = cutPlain(t.spasmConstrictionPct);
  const edPct = cutPlain(t.endothelialDysfunctionPct);
  switch (worst) {
    case 'epicardial-spasm':
      reasons.push(
        `Acetylcholine ${doseName(d)}: ${constrictionText(d.constrictionPct, t)}% constriction with reproduced symptoms and ischaemic ECG changes meets the ≥ ${spasmPct}% criterion for epicardial spasm (${src}).`,
      );
      break;
    case 'microvascular-spasm':
      reasons.push(
        `Acetylcholine ${doseName(d)}: reproduced symptoms and ischaemic ECG changes with ${constrictionText(d.constrictionPct, t)}% constriction (below ${spasmPct}%) — microvascular spasm (${src}).`,
      );
      break;
    case 'equivocal':
      reasons.push(
        `Acetylcholine ${doseName(d)}: ${constrictionText(d.constrictionPct, t)}% constriction with ${criteriaSeen(d)} — equivocal: part of the criteria for spasm, not all (${src}).`,
      );
      break;
    case 'endothelial-dysfunction':
      reasons.push(
        `Acetylcholine ${doseName(d)}: ${constrictionText(d.constrictionPct, t)}% constriction without symptoms or ischaemic ECG changes, at or above ${edPct}% (${cite(t, 'endothelialDysfunctionPct')}) — endothelial dysfunction, not spasm (${src}).`,
      );
      break;
    default: {
      // A test that stopped before the protocol's last dose is negative only as far as it went.
      const bothSides = new Set(doses.map((x) => rightCoronaryVessels.has(x.vessel))).size > 1;
      const short = protocolShortfalls(doses, t)
        .map((s) => `${bothSides ? `into the ${s.side} coronary ` : ''}up to ${cutPlain(s.highest)} µg (${cutPlain(s.last)} µg not given: incomplete protocol)`)
        .join(' and ');
      reasons.push(
        `Acetylcholine testing was negative${short ? ` ${short}` : ''}: maximum constriction ${constrictionText(maxPct, t)}% (below ${edPct}%, ${cite(t, 'endothelialDysfunctionPct')}) and no dose reproduced symptoms or ischaemic ECG changes (${src}).`,
      );
    }
  }
  return { result: worst, doses: out, warnings };
}
