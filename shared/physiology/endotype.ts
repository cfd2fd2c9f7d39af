import type { Ctx } from './context';
import { cutPlain, cutRatio, fmt, ratio } from './format';
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

/**
 * Study findings and endotype from the analysed vessels and the acetylcholine result.
 * Reasons: one sentence per rule that fired — per vessel, then acetylcholine, then the endotype.
 */
export function classifyStudy(
  vessels: readonly VesselResult[],
  labels: readonly string[],
  vaso: VasoreactivityResult | undefined,
  vasoReasons: readonly string[],
  ctx: Ctx,
): { findings: Findings; endotype: Endotype; reasons: string[] } {
  const t = ctx.t;
  let obstructive = false;
  const obstructiveLabels: string[] = [];
  let structural = false;
  let functional = false;
  let borderlineCfr = false;
  let lowRrr = false;
  let lowMrr = false;
  let epicardialAssessed = false;
  let microAssessed = false;
  let imrMeasuredInFunctional = true;

  const reasons: string[] = [];
  for (let i = 0; i < vessels.length; i++) {
    const v = vessels[i];
    const label = labels[i];
    let vesselObstructive = false;

    if (v.ffr !== undefined && v.ffrFlag !== undefined) {
      epicardialAssessed = true;
      if (v.ffrFlag === 'abnormal') {
        vesselObstructive = true;
        reasons.push(label + ': FFR ' + ratio(v.ffr, t.ffr) + ctx.ffrAbnormal);
        if (v.ffrGreyZone) reasons.push(label + ': FFR ' + ratio(v.ffr, t.ffr) + ctx.ffrGreyZone);
      }
      // An entered resting ratio that disagrees with FFR: FFR decides.
      if (v.nhprFlag !== undefined && v.nhprFlag !== v.ffrFlag) {
        const rest = restingIndex(v, t) as RestingIndex;
        const restSide = rest.flag === 'abnormal' ? 'at or below' : 'above';
        const ffrSide = v.ffrFlag === 'abnormal' ? 'at or below' : 'above';
        reasons.push(
          `${label}: the ${rest.name} ${ratio(rest.value, rest.cut)} (${restSide} ${cutRatio(rest.cut)}, ${rest.src}) and FFR ${ratio(v.ffr, t.ffr)} (${ffrSide} ${ctx.ffrCut}) disagree; FFR decides the obstructive finding.`,
        );
      }
    } else {
      const rest = restingIndex(v, t);
      if (rest !== undefined) {
        epicardialAssessed = true;
        if (rest.flag === 'abnormal') {
          vesselObstructive = true;
          reasons.push(label + ': ' + rest.name + ' ' + ratio(rest.value, rest.cut) + ctx.restAbnormal[rest.key]);
        }
      }
    }
    if (vesselObstructive) {
      obstructive = true;
      obstructiveLabels.push(label);
    }

    if (v.imr !== undefined || v.cfr !== undefined) microAssessed = true;
    if (v.imr !== undefined && v.imrFlag === 'abnormal') {
      if (!vesselObstructive) structural = true;
      reasons.push(
        label +
          ': IMR ' +
          fmt(v.imr, 1, t.imr) +
          imrMethodName[v.imrMethod ?? 'pd-tmn'] +
          (vesselObstructive ? ctx.imrAbnormalObstructed : ctx.imrAbnormal),
      );
    }
    if (v.cfr !== undefined) {
      if (v.cfrFlag === 'abnormal') {
        if (!vesselObstructive) {
          functional = true;
          if (v.imr === undefined) imrMeasuredInFunctional = false;
        }
        reasons.push(
          label + ': CFR ' + ratio(v.cfr, t.cfr) + (vesselObstructive ? ctx.cfrAbnormalObstructed : ctx.cfrAbnormal),
        );
      } else if (v.cfrFlag === 'borderline') {
        if (!vesselObstructive) borderlineCfr = true;
        reasons.push(label + ': CFR ' + ratio(v.cfr) + ctx.cfrBorderline);
      }
    }
    if (v.rrr !== undefined && v.rrrFlag === 'abnormal') {
      if (!vesselObstructive) lowRrr = true;
      reasons.push(label + ': RRR ' + ratio(v.rrr, t.rrr) + ctx.rrrAbnormal);
    }
    if (v.mrr !== undefined && v.mrrFlag === 'abnormal') {
      if (!vesselObstructive) lowMrr = true;
      reasons.push(label + ': MRR ' + ratio(v.mrr, t.mrr) + ctx.mrrAbnormal);
    }
  }
  for (let i = 0; i < vasoReasons.length; i++) reasons.push(vasoReasons[i]);

  const microvascular: Findings['microvascular'] = structural ? 'structural' : functional ? 'functional' : null;
  const vr = vaso?.result;
  const vasospasm: Findings['vasospasm'] =
    vr === 'epicardial-spasm' ? 'epicardial' : vr === 'microvascular-spasm' ? 'microvascular' : null;

  let endotype: Endotype;
  const cmdText =
    microvascular === 'structural'
      ? `structural microvascular dysfunction, IMR at or above ${cutPlain(t.imr)}`
      : microvascular === 'functional'
        ? `functional microvascular dysfunction, CFR below ${cutRatio(t.cfr)} with IMR ${imrMeasuredInFunctional ? 'below the cut-off' : 'not measured'}`
        : '';
  if (obstructive) {
    endotype = 'obstructive';
    reasons.push(
      `Endotype: obstructive — abnormal FFR or resting ratio in ${obstructiveLabels.join(', ')}; obstructive disease takes precedence over microvascular and vasospastic findings (EAPCI 2020).`,
    );
  } else if (microvascular !== null || vasospasm === 'microvascular') {
    const parts: string[] = [];
    if (cmdText) parts.push(cmdText);
    if (vasospasm === 'microvascular') parts.push('microvascular spasm');
    if (vasospasm === 'epicardial') {
      endotype = 'mixed';
      reasons.push(
        `Endotype: mixed — microvascular angina (${parts.join('; ')}) together with epicardial spasm, with no obstructive stenosis (COVADIS; EAPCI 2020).`,
      );
    } else {
      endotype = 'microvascular-angina';
      reasons.push(
        `Endotype: microvascular angina (${parts.join('; ')}) with no obstructive stenosis (COVADIS; EAPCI 2020).`,
      );
    }
  } else if (vasospasm === 'epicardial') {
    endotype = 'vasospastic-angina';
    reasons.push(
      'Endotype: vasospastic angina — epicardial spasm with no obstructive stenosis and no microvascular dysfunction found (COVADIS; EAPCI 2020).',
    );
  } else {
    const missing: string[] = [];
    if (!epicardialAssessed) missing.push('an epicardial pressure index (FFR or a resting ratio)');
    if (!microAssessed) missing.push('a microvascular index (CFR or IMR)');
    if (vaso === undefined) missing.push('acetylcholine testing');
    const notes: string[] = [];
    if (borderlineCfr) notes.push('a borderline CFR');
    if (lowRrr) notes.push('a low RRR');
    if (lowMrr) notes.push('a low MRR');
    if (vr === 'endothelial-dysfunction') notes.push('endothelial dysfunction');
    const noted = notes.length > 0 ? `; ${notes.join(' and ')} ${notes.length > 1 ? 'were' : 'was'} noted but ${notes.length > 1 ? 'do' : 'does'} not define an endotype` : '';
    if (missing.length === 0) {
      endotype = 'no-abnormality';
      reasons.push(
        `Endotype: no coronary abnormality — no obstructive stenosis, CFR and IMR within the lab's thresholds and no spasm on acetylcholine testing${noted} (EAPCI 2020).`,
      );
    } else {
      endotype = 'inconclusive';
      reasons.push(
        `Endotype: inconclusive — nothing abnormal was found, but ${joinAnd(missing)} ${missing.length > 1 ? 'were' : 'was'} not assessed${noted}.`,
      );
    }
  }
  return { findings: { obstructive, microvascular, endothelialDysfunction: vr === 'endothelial-dysfunction', vasospasm }, endotype, reasons };
}

function joinAnd(xs: string[]): string {
  if (xs.length <= 1) return xs.join('');
  return `${xs.slice(0, -1).join(', ')} and ${xs[xs.length - 1]}`;
}
