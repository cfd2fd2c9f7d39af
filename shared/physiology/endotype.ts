import type { Ctx } from './context';
import { cutPlain, cutRatio, imrText, joinAnd, ratio } from './format';
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

const microWords: Record<NonNullable<Findings['microvascular']>, string> = {
  structural: 'structural coronary microvascular dysfunction (low CFR, raised IMR)',
  functional: 'functional coronary microvascular dysfunction (low CFR, IMR not raised)',
  'raised-imr': 'raised microvascular resistance with preserved CFR',
};
const spasmWords = { epicardial: 'epicardial coronary spasm', microvascular: 'microvascular spasm' } as const;

const microRank = { structural: 3, functional: 2, 'raised-imr': 1 } as const;

export interface Classification {
  findings: Findings;
  endotype: Endotype;
  headline: string;
  reasons: string[];
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
): Classification {
  const t = ctx.t;
  const obstructiveLabels: string[] = [];
  const clearLabels: string[] = [];
  let microvascular: Findings['microvascular'] = null;
  let borderlineCfr = false;
  let lowRrr = false;
  let lowMrr = false;
  let epicardialAssessed = false;
  let cfrMeasured = false;
  let imrMeasured = false;
  let functionalWithoutImr = false;
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
      v.obstructive = v.visualStenosisPct >= t.obstructiveStenosisPct;
      if (v.obstructive) reasons.push(`${label}: visual stenosis ${cutPlain(v.visualStenosisPct)}%${ctx.stenosisObstructive}`);
    }
    if (v.judgedBy !== undefined && v.judgedBy !== 'visual-stenosis') epicardialAssessed = true;
    if (
      v.judgedBy !== undefined &&
      v.judgedBy !== 'visual-stenosis' &&
      !v.obstructive &&
      v.visualStenosisPct !== undefined &&
      v.visualStenosisPct >= t.obstructiveStenosisPct
    ) {
      reasons.push(
        `${label}: visual stenosis ${cutPlain(v.visualStenosisPct)}% is at or above ${ctx.stenosisCut}%, but the pressure index is above its cut-off; the pressure index decides (COVADIS), so the vessel is not obstructive.`,
      );
    }
    if (v.obstructive) obstructiveLabels.push(label);
    else if (v.judgedBy !== undefined) clearLabels.push(label);
    const obstructed = v.obstructive === true;

    // Microvascular function, in vessels without an obstructive stenosis.
    const cfrLow = v.cfrFlag === 'abnormal';
    const imrHigh = v.imrFlag === 'abnormal';
    // Microvascular dysfunction is judged only where obstruction was excluded in the same vessel
    // (COVADIS; EAPCI 2020): a pressure index above its cut-off, or a visual stenosis below 50%.
    if (!obstructed && v.judgedBy !== undefined) {
      if (v.cfr !== undefined) cfrMeasured = true;
      if (v.imr !== undefined) imrMeasured = true;
      const kind: Findings['microvascular'] = cfrLow && imrHigh ? 'structural' : cfrLow ? 'functional' : imrHigh ? 'raised-imr' : null;
      if (kind !== null && (microvascular === null || microRank[kind] > microRank[microvascular])) microvascular = kind;
      if (kind === 'functional' && v.imr === undefined) functionalWithoutImr = true;
    } else if (!obstructed && (cfrLow || imrHigh)) {
      reasons.push(
        `${label}: ${cfrLow ? 'CFR' : 'IMR'} is abnormal, but obstruction was not excluded in this vessel (no pressure index and no stenosis estimate), so it is not used for a microvascular finding (COVADIS; EAPCI 2020).`,
      );
    }
    if (v.imr !== undefined && imrHigh) {
      reasons.push(
        label +
          ': IMR ' +
          imrText(v.imr) +
          ' U' +
          imrMethodName[v.imrMethod ?? 'pd-tmn'] +
          ctx.imrAbnormal +
          (obstructed ? ctx.obstructedTail : cfrLow ? ' with impaired CFR (structural microvascular dysfunction).' : v.cfr !== undefined ? ' with CFR preserved — not structural dysfunction, which needs a low CFR as well.' : ' (CFR not measured).'),
      );
    }
    if (v.cfr !== undefined) {
      if (cfrLow) {
        reasons.push(
          label +
            ': CFR ' +
            ratio(v.cfr) +
            ctx.cfrAbnormal +
            (obstructed ? ctx.obstructedTail : imrHigh ? '.' : v.imr !== undefined ? ' with IMR not raised (functional microvascular dysfunction).' : '; IMR was not measured, so structural dysfunction cannot be told apart.'),
        );
      } else if (v.cfrFlag === 'borderline') {
        if (!obstructed) borderlineCfr = true;
        reasons.push(label + ': CFR ' + ratio(v.cfr) + ctx.cfrBorderline);
      }
    }
    if (v.rrr !== undefined && v.rrrFlag === 'abnormal') {
      if (!obstructed) lowRrr = true;
      reasons.push(label + ': RRR ' + ratio(v.rrr) + ctx.rrrAbnormal);
    }
    if (v.mrr !== undefined && v.mrrFlag === 'abnormal') {
      if (!obstructed) lowMrr = true;
      reasons.push(label + ': MRR ' + ratio(v.mrr) + ctx.mrrAbnormal);
    } else if (v.mrr !== undefined && v.mrrFlag === 'borderline') {
      reasons.push(label + ': MRR ' + ratio(v.mrr) + ctx.mrrBorderline);
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

  const microText = (kind: NonNullable<Findings['microvascular']>) =>
    kind === 'functional' && functionalWithoutImr ? 'coronary microvascular dysfunction with low CFR (IMR not measured, so its type is not known)' : microWords[kind];
  const coexisting: string[] = [];
  if (microvascular !== null) coexisting.push(microText(microvascular));
  if (vasospasm !== null) coexisting.push(spasmWords[vasospasm]);
  if (endothelialDysfunction) coexisting.push('endothelial dysfunction');
  if (vr === 'equivocal') coexisting.push('an equivocal acetylcholine test');

  let endotype: Endotype;
  let headline: string;
  const cmdText =
    microvascular === 'structural'
      ? `structural microvascular dysfunction: CFR below ${cutRatio(t.cfr)} with IMR at or above ${cutPlain(t.imr)}`
      : microvascular === 'functional'
        ? `functional microvascular dysfunction: CFR below ${cutRatio(t.cfr)} with IMR ${functionalWithoutImr ? 'not measured' : 'below the cut-off'}`
        : microvascular === 'raised-imr'
          ? `raised microvascular resistance: IMR at or above ${cutPlain(t.imr)} with CFR not below ${cutRatio(t.cfr)}`
          : '';
  const withEd = endothelialDysfunction ? '; endothelial dysfunction on acetylcholine testing' : '';
  if (obstructive) {
    endotype = 'obstructive';
    headline = `Obstructive coronary disease (${obstructiveLabels.join(', ')})${coexisting.length ? `, with ${joinAnd(coexisting)}` : ''}`;
    reasons.push(
      `Endotype: obstructive — abnormal pressure index or obstructive stenosis in ${obstructiveLabels.join(', ')}${coexisting.length ? `; coexisting ${joinAnd(coexisting)} ${coexisting.length > 1 ? 'are' : 'is'} reported as well (ESC 2024)` : ''}.`,
    );
  } else if (microvascular !== null || vasospasm === 'microvascular') {
    const parts: string[] = [];
    if (cmdText) parts.push(cmdText);
    if (vasospasm === 'microvascular') parts.push('microvascular spasm');
    if (vasospasm === 'epicardial') {
      endotype = 'mixed';
      headline = `Microvascular and vasospastic angina: ${joinAnd([...(microvascular ? [microText(microvascular)] : []), spasmWords.epicardial])}${withEd}`;
      reasons.push(
        `Endotype: mixed — microvascular angina (${parts.join('; ')}) together with epicardial spasm, with no obstructive stenosis (COVADIS; EAPCI 2020).`,
      );
    } else {
      endotype = 'microvascular-angina';
      headline = `Microvascular angina: ${joinAnd([...(microvascular ? [microText(microvascular)] : []), ...(vasospasm === 'microvascular' ? [spasmWords.microvascular] : [])])}${withEd}`;
      reasons.push(`Endotype: microvascular angina (${parts.join('; ')}) with no obstructive stenosis (COVADIS; EAPCI 2020).`);
    }
  } else if (vasospasm === 'epicardial') {
    endotype = 'vasospastic-angina';
    headline = `Vasospastic angina: epicardial coronary spasm${withEd}`;
    reasons.push(
      'Endotype: vasospastic angina — epicardial spasm with no obstructive stenosis and no microvascular dysfunction found (COVADIS; EAPCI 2020).',
    );
  } else {
    const missing: string[] = [];
    if (!epicardialAssessed) missing.push('an epicardial pressure index (FFR or a resting ratio)');
    if (!cfrMeasured) missing.push('CFR');
    if (!imrMeasured) missing.push('IMR');
    if (vaso === undefined) missing.push('acetylcholine testing');
    const notes: string[] = [];
    if (borderlineCfr) notes.push('a borderline CFR');
    if (lowRrr) notes.push('a low RRR');
    if (lowMrr) notes.push('a low MRR');
    const noted = notes.length > 0 ? `; ${joinAnd(notes)} ${notes.length > 1 ? 'were' : 'was'} noted but ${notes.length > 1 ? 'do' : 'does'} not define an endotype` : '';
    if (missing.length === 0 && vr !== 'equivocal') {
      endotype = 'no-abnormality';
      if (endothelialDysfunction) {
        headline = 'No obstructive disease, microvascular dysfunction or spasm; endothelial dysfunction on acetylcholine testing';
        reasons.push(
          `Endotype: no obstructive stenosis, CFR and IMR within the lab's thresholds and no spasm on acetylcholine testing, but endothelial dysfunction was found — reported as a finding, not spasm${noted} (EAPCI 2020; COVADIS).`,
        );
      } else {
        headline = 'No coronary abnormality found';
        reasons.push(
          `Endotype: no coronary abnormality — no obstructive stenosis, CFR and IMR within the lab's thresholds and no spasm on acetylcholine testing${noted} (EAPCI 2020).`,
        );
      }
    } else {
      endotype = 'inconclusive';
      const coronaryFunctionTested = cfrMeasured || imrMeasured || vaso !== undefined;
      const why = [
        ...(missing.length > 0 ? [`${joinAnd(missing)} ${missing.length > 1 ? 'were' : 'was'} not assessed`] : []),
        ...(vr === 'equivocal' ? ['the acetylcholine test was equivocal'] : []),
      ];
      if (!coronaryFunctionTested) {
        // A pressure-wire study of a lesion: speak of the lesions, not of an endotype.
        headline =
          clearLabels.length > 0
            ? `No obstructive stenosis (${clearLabels.join(', ')})`
            : 'Nothing to judge yet';
      } else {
        headline = `Endotype not determined: ${joinAnd(why)}${withEd}`;
      }
      reasons.push(`Endotype: inconclusive — nothing abnormal was found, but ${joinAnd(why)}${noted}.`);
    }
  }
  if (caveats.length > 0) headline += ` — caution: quality check failed in ${caveats.map((c) => c.slice(0, c.indexOf(' ('))).join(', ')}`;
  return { findings: { obstructive, microvascular, endothelialDysfunction, vasospasm }, endotype, headline, reasons };
}
