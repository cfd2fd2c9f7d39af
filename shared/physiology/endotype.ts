import type { Ctx } from './context';
import { atOrAbove } from './compare';
import { cutPlain, cutRatio, imrText, joinAnd, ratio } from './format';
import { formatAgreeing } from './precision';
import { nhprCutoffKey, nhprName } from './indices';
import { cite, type Thresholds } from './thresholds';
import type { Endotype, Findings, Flag, VasoreactivityResult, VesselResult } from './types';

interface RestingIndex {
  key: 'restingPdPa' | 'nhprWholeCycle' | 'nhprDiastolic' | 'nhprFullCycleMinimum';
  name: string;
  value: number;
  flag: Flag;
  cut: number;
  src: string;
}

/** The resting ratio that stands in for FFR: the entered one, else whole-cycle Pd/Pa from the pressures. */
function restingIndex(v: VesselResult, t: Thresholds): RestingIndex | undefined {
  if (v.nhpr !== undefined && v.nhprKind !== undefined && v.nhprFlag !== undefined) {
    const key = nhprCutoffKey(v.nhprKind);
    return { key, name: nhprName(v.nhprKind), value: v.nhpr, flag: v.nhprFlag, cut: t[key], src: cite(t, key) };
  }
  if (v.restingPdPa !== undefined && v.restingPdPaFlag !== undefined) {
    return {
      key: 'restingPdPa',
      name: 'resting whole-cycle Pd/Pa',
      value: v.restingPdPa,
      flag: v.restingPdPaFlag,
      cut: t.restingPdPa,
      src: cite(t, 'restingPdPa'),
    };
  }
  return undefined;
}

/** A visual stenosis as text on the same side of the obstructive cut-off as the value judged. */
export function stenosisText(pct: number, t: Pick<Thresholds, 'obstructiveStenosisPct'>): string {
  return formatAgreeing(pct, 'percent', (x) => atOrAbove(x, t.obstructiveStenosisPct, 'raw'));
}

const imrMethodName = {
  'pd-tmn': ' (Pd × Tmn)',
  wedge: ' (wedge-corrected)',
  yong: ' (corrected without wedge)',
} as const;

/** Quality warnings that make a judged value doubtful enough to qualify the headline. */
const doubtfulQuality: Record<string, string> = {
  'drift-out-of-range': 'drift outside the accepted window',
  'pd-above-pa': 'Pd above Pa',
  'hyperemic-above-resting': 'hyperaemic Pd/Pa above resting',
  'hyperemia-inadequate': 'hyperaemia possibly inadequate',
  'cfr-below-one': 'CFR below 1',
  'ffr-mismatch': 'entered FFR disagrees with the pressures',
};

/**
 * One vessel's microvascular finding as it is worded. The first three are the contract's subtypes; the
 * other three are dysfunction whose type cannot be decided (the partner index was not measured), or
 * raised resistance beside a borderline CFR, worded as such.
 */
type MicroWording =
  | 'structural'
  | 'functional'
  | 'raised-imr'
  | 'raised-imr-cfr-borderline'
  | 'low-cfr-imr-missing'
  | 'raised-imr-cfr-missing';

/** The contract's subtype for each wording; null where the type cannot be decided. */
const microSubtype: Record<MicroWording, NonNullable<Findings['microvascular']> | null> = {
  structural: 'structural',
  functional: 'functional',
  'raised-imr': 'raised-imr',
  'raised-imr-cfr-borderline': 'raised-imr',
  'low-cfr-imr-missing': null,
  'raised-imr-cfr-missing': null,
};

/** One vessel's microvascular finding in words. */
function microPhrase(kind: MicroWording): string {
  switch (kind) {
    case 'structural':
      return 'structural coronary microvascular dysfunction (low CFR, raised IMR)';
    case 'functional':
      return 'functional coronary microvascular dysfunction (low CFR, IMR not raised)';
    case 'low-cfr-imr-missing':
      return 'coronary microvascular dysfunction with low CFR (IMR not measured, so its type is not known)';
    case 'raised-imr-cfr-missing':
      return 'coronary microvascular dysfunction with raised IMR (CFR not measured, so its type is not known)';
    case 'raised-imr-cfr-borderline':
      return 'raised microvascular resistance with borderline CFR';
    default:
      return 'raised microvascular resistance with preserved CFR';
  }
}

const spasmWords = { epicardial: 'epicardial coronary spasm', microvascular: 'microvascular spasm' } as const;

/** The study's subtype is the most severe typed one found in any vessel. */
const microRank = { structural: 3, functional: 2, 'raised-imr': 1 } as const;

interface MicroGroup {
  kind: MicroWording;
  labels: string[];
}

export interface Classification {
  findings: Findings;
  endotype: Endotype;
  headline: string;
  reasons: string[];
  /**
   * Everything else needed for "no coronary abnormality" was met, but acetylcholine showed endothelial
   * dysfunction: the test is not negative, so the endotype is left open (the caller may add doubts).
   */
  normalButEndothelial: boolean;
}

/**
 * Study findings, endotype and headline from the analysed vessels and the acetylcholine result.
 * Sets each vessel's `obstructive` and `judgedBy`. Reasons: one sentence per rule that fired — per
 * vessel, then acetylcholine, then quality caveats, then the endotype.
 */
export function classifyStudy(
  vessels: readonly VesselResult[],
  labels: readonly string[],
  vaso: VasoreactivityResult | undefined,
  vasoReasons: readonly string[],
  ctx: Ctx,
  angina?: boolean,
): Classification {
  const t = ctx.t;
  const obstructiveLabels: string[] = [];
  const clearLabels: string[] = [];
  let microvascular: Findings['microvascular'] = null;
  let microvascularDysfunction = false;
  let borderlineCfr = false;
  let lowRrr = false;
  let lowMrr = false;
  let epicardialAssessed = false;
  // CFR and IMR are judged together only within one vessel (never a CFR from one and an IMR from another).
  let cfrJudgedAny = false;
  let imrJudgedAny = false;
  let bothJudgedInOneVessel = false;
  const microGroups: MicroGroup[] = [];
  const unjudgedThermo: string[] = [];
  /** Abnormal CFR or IMR in a vessel where obstruction was not excluded: not a finding, but not normal either. */
  const unjudgedAbnormal: string[] = [];
  const caveats: string[] = [];

  const reasons: string[] = [];
  for (let i = 0; i < vessels.length; i++) {
    const v = vessels[i];
    const label = labels[i];

    // Obstruction (COVADIS): a pressure index decides; without one, the visual stenosis.
    const rest = restingIndex(v, t);
    if (v.ffr !== undefined && v.ffrFlag !== undefined) {
      v.judgedBy = 'ffr';
      v.obstructive = v.ffrFlag === 'abnormal';
      if (v.obstructive) {
        reasons.push(label + ': FFR ' + ratio(v.ffr) + ctx.ffrAbnormal);
        if (v.ffrGreyZone) reasons.push(label + ': FFR ' + ratio(v.ffr) + ctx.ffrGreyZone);
      }
      // An entered resting ratio that disagrees with FFR: FFR decides.
      if (v.nhprFlag !== undefined && v.nhprFlag !== v.ffrFlag && rest !== undefined) {
        const restSide = rest.flag === 'abnormal' ? 'at or below' : 'above';
        const ffrSide = v.ffrFlag === 'abnormal' ? 'at or below' : 'above';
        reasons.push(
          `${label}: the ${rest.name} ${ratio(rest.value)} (${restSide} ${cutRatio(rest.cut)}, ${rest.src}) and FFR ${ratio(v.ffr)} (${ffrSide} ${ctx.ffrCut}) disagree; FFR decides the obstructive finding.`,
        );
      }
    } else if (rest !== undefined) {
      v.judgedBy = rest.key === 'restingPdPa' ? 'resting-pd-pa' : 'nhpr';
      v.obstructive = rest.flag === 'abnormal';
      if (v.obstructive) reasons.push(label + ': ' + rest.name + ' ' + ratio(rest.value) + ctx.restAbnormal[rest.key]);
    } else if (v.visualStenosisPct !== undefined) {
      v.judgedBy = 'visual-stenosis';
      v.obstructive = atOrAbove(v.visualStenosisPct, t.obstructiveStenosisPct, 'raw');
      if (v.obstructive) reasons.push(`${label}: visual stenosis ${stenosisText(v.visualStenosisPct, t)}%${ctx.stenosisObstructive}`);
    }
    if (v.judgedBy !== undefined && v.judgedBy !== 'visual-stenosis') epicardialAssessed = true;
    if (
      v.judgedBy !== undefined &&
      v.judgedBy !== 'visual-stenosis' &&
      !v.obstructive &&
      v.visualStenosisPct !== undefined &&
      atOrAbove(v.visualStenosisPct, t.obstructiveStenosisPct, 'raw')
    ) {
      reasons.push(
        `${label}: visual stenosis ${stenosisText(v.visualStenosisPct, t)}% is at or above ${ctx.stenosisCut}%, but the pressure index is above its cut-off; the pressure index decides (COVADIS), so the vessel is not obstructive.`,
      );
    }
    // A stenosis seen but not measured says so in the headline, as the lesion report does.
    if (v.obstructive) obstructiveLabels.push(v.judgedBy === 'visual-stenosis' ? `${label} by angiography, not assessed physiologically` : label);
    else if (v.judgedBy !== undefined) clearLabels.push(label);
    const obstructed = v.obstructive === true;

    // Microvascular function, in vessels without an obstructive stenosis, from this vessel's own CFR and IMR.
    const cfrLow = v.cfrFlag === 'abnormal';
    const imrHigh = v.imrFlag === 'abnormal';
    const cfrJudged = v.cfrFlag !== undefined;
    const imrJudged = v.imrFlag !== undefined;
    if (v.warnings.some((w) => w.code === 'cfr-below-one')) {
      unjudgedThermo.push(label);
      reasons.push(
        `${label}: CFR ${ratio(v.cfr ?? 0)} is below 1 — most likely a measurement error (transit times swapped or faulty); CFR and the indices from the transit times are shown but not judged, and no microvascular finding is drawn from them.`,
      );
    }
    // Microvascular dysfunction is judged only where obstruction was excluded in the same vessel
    // (COVADIS; EAPCI 2020): a pressure index above its cut-off, or a visual stenosis below 50%.
    if (!obstructed && v.judgedBy !== undefined) {
      if (cfrJudged) cfrJudgedAny = true;
      if (imrJudged) imrJudgedAny = true;
      if (cfrJudged && imrJudged) bothJudgedInOneVessel = true;
      // Functional needs IMR measured and not raised, structural a low CFR with a raised IMR (EAPCI 2020;
      // ILIAS): a low CFR without IMR, or a raised IMR without CFR, is dysfunction of a type not known.
      const kind: MicroWording | null =
        cfrLow && imrHigh
          ? 'structural'
          : cfrLow
            ? imrJudged
              ? 'functional'
              : 'low-cfr-imr-missing'
            : imrHigh
              ? !cfrJudged
                ? 'raised-imr-cfr-missing'
                : v.cfrFlag === 'borderline'
                  ? 'raised-imr-cfr-borderline'
                  : 'raised-imr'
              : null;
      if (kind !== null) {
        microvascularDysfunction = true;
        v.microvascularDysfunction = true;
        const subtype = microSubtype[kind];
        if (subtype !== null) {
          v.microvascular = subtype;
          if (microvascular === null || microRank[subtype] > microRank[microvascular]) microvascular = subtype;
        }
        const group = microGroups.find((g) => g.kind === kind);
        if (group) group.labels.push(label);
        else microGroups.push({ kind, labels: [label] });
      }
    } else if (!obstructed && (cfrLow || imrHigh)) {
      const which = cfrLow && imrHigh ? `CFR ${ratio(v.cfr ?? 0)} and IMR ${imrText(v.imr ?? 0)}` : cfrLow ? `CFR ${ratio(v.cfr ?? 0)}` : `IMR ${imrText(v.imr ?? 0)}`;
      unjudgedAbnormal.push(`${label} ${which}`);
      reasons.push(
        `${label}: ${which} ${cfrLow && imrHigh ? 'are' : 'is'} abnormal, but obstruction was not excluded in this vessel (no pressure index and no stenosis estimate), so it is not used for a microvascular finding (COVADIS; EAPCI 2020).`,
      );
    }
    // Where no microvascular finding is drawn, every CFR, IMR, RRR and MRR sentence says so.
    const excluded = !obstructed && v.judgedBy !== undefined;
    const notUsed = obstructed ? ctx.notUsedObstructed : excluded ? '' : ctx.notUsedUnexcluded;
    if (v.imr !== undefined && imrHigh) {
      reasons.push(
        label +
          ': IMR ' +
          imrText(v.imr) +
          ' U' +
          imrMethodName[v.imrMethod ?? 'pd-tmn'] +
          ctx.imrAbnormal +
          (!excluded
            ? notUsed + '.'
            : cfrLow
              ? ' with impaired CFR (structural microvascular dysfunction).'
              : v.cfrFlag === 'borderline'
                ? ` with CFR ${ratio(v.cfr ?? 0)} borderline, not low — not structural dysfunction, which needs a low CFR as well.`
                : v.cfrFlag === 'normal'
                  ? ' with CFR preserved — not structural dysfunction, which needs a low CFR as well.'
                  : '; CFR was not measured, so its type cannot be decided (structural dysfunction needs a low CFR as well).') +
          (v.warnings.some((w) => w.code === 'hyperemia-inadequate')
            ? ' Hyperaemia may have been inadequate: the hyperaemic transit time would then be too long, so this IMR may be overestimated.'
            : ''),
      );
    }
    if (v.cfr !== undefined) {
      if (cfrLow) {
        reasons.push(
          label +
            ': CFR ' +
            ratio(v.cfr) +
            ctx.cfrAbnormal +
            (!excluded
              ? notUsed + '.'
              : imrHigh
                ? '.'
                : imrJudged
                  ? ' with IMR not raised (functional microvascular dysfunction).'
                  : '; IMR was not measured, so whether it is structural or functional cannot be decided.'),
        );
      } else if (v.cfrFlag === 'borderline') {
        if (excluded) borderlineCfr = true;
        reasons.push(label + ': CFR ' + ratio(v.cfr) + ctx.cfrBorderline);
      }
    }
    if (v.rrr !== undefined && v.rrrFlag === 'abnormal') {
      if (excluded) lowRrr = true;
      reasons.push(label + ': RRR ' + ratio(v.rrr) + ctx.rrrAbnormal + notUsed + '.');
    }
    if (v.mrr !== undefined && v.mrrFlag === 'abnormal') {
      if (excluded) lowMrr = true;
      reasons.push(`${label}: MRR ${ratio(v.mrr)}${ctx.mrrAbnormal}${notUsed}; ${ctx.mrrMethod}.`);
    } else if (v.mrr !== undefined && v.mrrFlag === 'borderline') {
      reasons.push(`${label}: MRR ${ratio(v.mrr)}${ctx.mrrBorderline}${notUsed ? `${notUsed};` : ' —'} ${ctx.mrrMethod}.`);
    }

    // A judged value that failed a quality check qualifies what is said about it.
    const judged = v.judgedBy !== undefined || v.cfr !== undefined || v.imr !== undefined;
    if (judged) {
      const doubts = v.warnings.filter((w) => doubtfulQuality[w.code] !== undefined).map((w) => doubtfulQuality[w.code]);
      if (doubts.length > 0) caveats.push(`${label} (${joinAnd([...new Set(doubts)])})`);
    }
  }
  for (let i = 0; i < vasoReasons.length; i++) reasons.push(vasoReasons[i]);
  if (caveats.length > 0) {
    reasons.push(
      `Caution: ${joinAnd(caveats)} failed a quality check; the values and the findings drawn from them may be wrong — repeat the measurement or interpret with care.`,
    );
  }

  const obstructive = obstructiveLabels.length > 0;
  const vr = vaso?.result;
  const vasospasm: Findings['vasospasm'] =
    vr === 'epicardial-spasm' ? 'epicardial' : vr === 'microvascular-spasm' ? 'microvascular' : null;
  const endothelialDysfunction = vr === 'endothelial-dysfunction';
  const equivocalAch = vr === 'equivocal';

  // Each vessel's microvascular finding is named with its vessels, never merged into one.
  const microParts = microGroups.map((g) => `${microPhrase(g.kind)} in ${joinAnd(g.labels)}`);
  const cfrNormalFrom = cutRatio(Math.max(t.cfr, t.cfrBorderline));
  const cmdParts = microGroups.map((g) => {
    const where = ` in ${joinAnd(g.labels)}`;
    switch (g.kind) {
      case 'structural':
        return `structural microvascular dysfunction${where}: CFR below ${cutRatio(t.cfr)} with IMR at or above ${cutPlain(t.imr)}`;
      case 'functional':
        return `functional microvascular dysfunction${where}: CFR below ${cutRatio(t.cfr)} with IMR below the cut-off`;
      case 'low-cfr-imr-missing':
        return `microvascular dysfunction with low CFR${where}: CFR below ${cutRatio(t.cfr)} with IMR not measured, so whether it is structural or functional cannot be decided`;
      case 'raised-imr-cfr-missing':
        return `microvascular dysfunction with raised IMR${where}: IMR at or above ${cutPlain(t.imr)} with CFR not measured, so its type cannot be decided`;
      case 'raised-imr-cfr-borderline':
        return `raised microvascular resistance${where}: IMR at or above ${cutPlain(t.imr)} with CFR borderline (${cutRatio(t.cfr)} to below ${cfrNormalFrom}), not low`;
      default:
        return `raised microvascular resistance${where}: IMR at or above ${cutPlain(t.imr)} with CFR not below ${cfrNormalFrom}`;
    }
  });
  const coexisting: string[] = [...microParts];
  if (vasospasm !== null) coexisting.push(spasmWords[vasospasm]);
  if (endothelialDysfunction) coexisting.push('endothelial dysfunction');
  if (equivocalAch) coexisting.push('an equivocal acetylcholine test');

  // Acetylcholine results that are not spasm, named beside any microvascular or spasm endotype.
  const achTail = endothelialDysfunction
    ? '; endothelial dysfunction on acetylcholine testing'
    : equivocalAch
      ? '; equivocal acetylcholine test (criteria for spasm only partly met)'
      : '';
  const achReason = endothelialDysfunction
    ? '; endothelial dysfunction was found on acetylcholine testing'
    : equivocalAch
      ? '; the acetylcholine test was equivocal (criteria for spasm only partly met)'
      : '';
  // COVADIS calls these "angina" only in a patient with the symptom.
  const hasAngina = angina === true;
  const anginaState = angina === false ? 'the record says the patient has no angina' : 'angina is not recorded';
  const capital = (x: string) => x.charAt(0).toUpperCase() + x.slice(1);

  let endotype: Endotype;
  let headline: string;
  let normalButEndothelial = false;
  if (obstructive) {
    endotype = 'obstructive';
    headline = `Obstructive coronary disease (${obstructiveLabels.join(', ')})${coexisting.length ? `, with ${joinAnd(coexisting)}` : ''}`;
    reasons.push(
      `Endotype: obstructive — abnormal pressure index or obstructive stenosis in ${obstructiveLabels.join(', ')}${coexisting.length ? `; coexisting ${joinAnd(coexisting)} ${coexisting.length > 1 ? 'are' : 'is'} reported as well (ESC 2024)` : ''}.`,
    );
  } else if (microvascularDysfunction || vasospasm === 'microvascular') {
    const parts: string[] = [...cmdParts];
    if (vasospasm === 'microvascular') parts.push('microvascular spasm');
    if (vasospasm === 'epicardial') {
      endotype = 'mixed';
      const found = joinAnd([...microParts, spasmWords.epicardial]);
      headline = hasAngina ? `Microvascular and vasospastic angina: ${found}${achTail}` : `${capital(found)}${achTail}`;
      reasons.push(
        hasAngina
          ? `Endotype: mixed — microvascular angina (${parts.join('; ')}) together with epicardial spasm, with no obstructive stenosis${achReason} (COVADIS; EAPCI 2020).`
          : `Endotype: mixed — coronary microvascular dysfunction (${parts.join('; ')}) together with epicardial spasm, with no obstructive stenosis${achReason}; named microvascular and vasospastic angina only in a patient with angina, and ${anginaState} (COVADIS: Ong et al., Int J Cardiol 2018; Beltrame et al., Eur Heart J 2017).`,
      );
    } else {
      endotype = 'microvascular-angina';
      const found = joinAnd([...microParts, ...(vasospasm === 'microvascular' ? [spasmWords.microvascular] : [])]);
      headline = hasAngina ? `Microvascular angina: ${found}${achTail}` : `${capital(found)}${achTail}`;
      reasons.push(
        hasAngina
          ? `Endotype: microvascular angina (${parts.join('; ')}) with no obstructive stenosis${achReason} (COVADIS; EAPCI 2020).`
          : `Endotype: coronary microvascular dysfunction (${parts.join('; ')}) with no obstructive stenosis${achReason}; named microvascular angina only in a patient with angina, and ${anginaState} (COVADIS: Ong et al., Int J Cardiol 2018).`,
      );
    }
  } else if (vasospasm === 'epicardial') {
    endotype = 'vasospastic-angina';
    headline = hasAngina ? `Vasospastic angina: epicardial coronary spasm${achTail}` : `Epicardial vasospasm on acetylcholine testing${achTail}`;
    reasons.push(
      hasAngina
        ? 'Endotype: vasospastic angina — epicardial spasm with no obstructive stenosis and no microvascular dysfunction found (COVADIS; EAPCI 2020).'
        : `Endotype: epicardial vasospasm — epicardial spasm with no obstructive stenosis and no microvascular dysfunction found; named vasospastic angina only in a patient with angina, and ${anginaState} (COVADIS: Beltrame et al., Eur Heart J 2017).`,
    );
  } else {
    const missing: string[] = [];
    if (!epicardialAssessed) missing.push('an epicardial pressure index (FFR or a resting ratio)');
    if (!bothJudgedInOneVessel) {
      if (unjudgedThermo.length > 0 && !cfrJudgedAny) {
        // Said below: the transit times were measured but not judged.
      } else if (cfrJudgedAny && imrJudgedAny) missing.push('a vessel with both CFR and IMR');
      else {
        if (!cfrJudgedAny) missing.push('CFR');
        if (!imrJudgedAny) missing.push('IMR');
      }
    }
    if (vaso === undefined) missing.push('acetylcholine testing');
    const notes: string[] = [];
    if (borderlineCfr) notes.push('a borderline CFR');
    if (lowRrr) notes.push('a low RRR');
    if (lowMrr) notes.push('a low MRR');
    const noted = notes.length > 0 ? `; ${joinAnd(notes)} ${notes.length > 1 ? 'were' : 'was'} noted but ${notes.length > 1 ? 'do' : 'does'} not define an endotype` : '';
    if (missing.length === 0 && bothJudgedInOneVessel && !equivocalAch && unjudgedAbnormal.length === 0 && unjudgedThermo.length === 0) {
      if (endothelialDysfunction) {
        // "No coronary abnormality" needs a negative acetylcholine test (EAPCI 2020); endothelial
        // dysfunction is a finding, not spasm, and not one of the endotypes.
        endotype = 'inconclusive';
        normalButEndothelial = true;
        headline = 'No obstructive disease, microvascular dysfunction or spasm; endothelial dysfunction on acetylcholine testing';
        reasons.push(
          `Endotype: inconclusive — no obstructive stenosis, CFR and IMR within the lab's thresholds and no spasm on acetylcholine testing, but endothelial dysfunction was found — reported as a finding, not spasm; the acetylcholine test is not negative, so the study cannot be called free of coronary abnormality${noted} (EAPCI 2020; COVADIS).`,
        );
      } else {
        endotype = 'no-abnormality';
        headline = 'No coronary abnormality found';
        reasons.push(
          `Endotype: no coronary abnormality — no obstructive stenosis, CFR and IMR within the lab's thresholds and no spasm on acetylcholine testing${noted} (EAPCI 2020).`,
        );
      }
    } else {
      endotype = 'inconclusive';
      const coronaryFunctionTested = cfrJudgedAny || imrJudgedAny || unjudgedThermo.length > 0 || unjudgedAbnormal.length > 0 || vaso !== undefined;
      const why = [
        ...(missing.length > 0 ? [`${joinAnd(missing)} ${missing.length > 1 ? 'were' : 'was'} not assessed`] : []),
        ...(unjudgedThermo.length > 0 ? [`the transit times in ${joinAnd(unjudgedThermo)} gave a CFR below 1 and were not judged`] : []),
        ...(unjudgedAbnormal.length > 0
          ? [`${joinAnd(unjudgedAbnormal)} ${unjudgedAbnormal.length > 1 ? 'are' : 'is'} abnormal but not judged, because obstruction was not excluded there`]
          : []),
        ...(equivocalAch ? ['the acetylcholine test was equivocal'] : []),
      ];
      if (!coronaryFunctionTested) {
        // A pressure-wire study of a lesion: speak of the lesions, not of an endotype.
        headline =
          clearLabels.length > 0
            ? `No obstructive stenosis (${clearLabels.join(', ')})`
            : 'Nothing to judge yet';
      } else {
        headline = `Endotype not determined: ${joinAnd(why)}${endothelialDysfunction ? '; endothelial dysfunction on acetylcholine testing' : ''}`;
      }
      const lead = unjudgedAbnormal.length > 0 ? 'no abnormality can be concluded' : 'nothing abnormal was found';
      reasons.push(`Endotype: inconclusive — ${lead}, but ${joinAnd(why)}${noted}.`);
    }
  }
  if (caveats.length > 0) headline += ` — caution: quality check failed in ${caveats.map((c) => c.slice(0, c.indexOf(' ('))).join(', ')}`;
  return { findings: { obstructive, microvascular, microvascularDysfunction, endothelialDysfunction, vasospasm }, endotype, headline, reasons, normalButEndothelial };
}
