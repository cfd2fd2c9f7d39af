import type { MeasuredIndex, VesselCode } from '../schema';
import { anatomyOf, listNames, shortName } from '../vessels';
import type { Rule, RuleContext } from './rule';

const SRC = 'CPT 93571/93572 descriptor (flow reserve or pressure-derived measurement by wire during coronary angiography, pharmacologic stress included; initial vessel / each additional vessel); counting per vessel, not per index, as coding articles summarising CPT explain';

export const physiologyRules = {
  first: {
    id: 'cpt.physiology.first-vessel',
    title: 'Coronary physiology by wire: first vessel',
    system: 'CPT',
    source: SRC,
    release: 'CPT 2025',
    rationale: 'Physiology was measured by wire in {first} ({indices}); the first vessel is {code}, counted per vessel whatever indices were measured, and the hyperaemic drug is included (93463 is not added for it).',
  },
  additional: {
    id: 'cpt.physiology.additional-vessel',
    title: 'Coronary physiology by wire: each additional vessel',
    system: 'CPT',
    source: SRC,
    release: 'CPT 2025',
    rationale: 'Physiology was also measured in {others}: {units} additional vessel(s), {code} once per vessel.',
  },
  pcsPressure: {
    id: 'pcs.physiology.pressure',
    title: 'Inpatient facility: coronary pressure measurement',
    system: 'ICD-10-PCS',
    source: 'ICD-10-PCS 4A0 table: measurement, arterial, percutaneous, pressure, coronary [memory — check against the CMS PCS tables]',
    release: 'ICD-10-PCS FY2026',
    rationale: 'A pressure ratio ({indices}) was measured in {vessels}: coronary arterial pressure measurement, percutaneous, {code}.',
  },
  pcsFlow: {
    id: 'pcs.physiology.flow',
    title: 'Inpatient facility: coronary flow measurement',
    system: 'ICD-10-PCS',
    source: 'ICD-10-PCS 4A0 table: measurement, arterial, percutaneous, flow, coronary [memory — check against the CMS PCS tables]',
    release: 'ICD-10-PCS FY2026',
    rationale: 'Thermodilution flow indices ({indices}) were measured in {vessels}: coronary arterial flow measurement, percutaneous, {code}.',
  },
  restingOnly: {
    id: 'review.physiology.resting-only',
    title: 'Resting-only physiology against the "pharmacologic stress" wording',
    system: 'review',
    source: `${SRC}; whether a resting ratio without a hyperaemic drug meets the wording is not settled [memory]`,
    release: 'CPT 2025',
    rationale: 'Resting-only measurement may not meet the code wording.',
  },
  branchCounted: {
    id: 'review.physiology.branch-of-measured-vessel',
    title: 'A branch of a measured major vessel counted as another vessel',
    system: 'review',
    source: SRC,
    release: 'CPT 2025',
    rationale: 'A branch counted as an additional vessel.',
  },
} as const satisfies Record<string, Rule>;

const indexName: Record<MeasuredIndex, string> = { ffr: 'FFR', nhpr: 'resting ratio', cfr: 'CFR', imr: 'IMR' };
const order: MeasuredIndex[] = ['ffr', 'nhpr', 'cfr', 'imr'];

interface MeasuredVessel {
  vessel: VesselCode;
  indices: MeasuredIndex[];
  hyperemicAgent: boolean;
  rows: number;
}

/** Vessels with at least one measured index, one per vessel code (repeated rows are merged). */
function measuredVessels(ctx: RuleContext): MeasuredVessel[] {
  const map = new Map<VesselCode, MeasuredVessel>();
  for (const p of ctx.input.physiology) {
    if (p.measured.length === 0) continue;
    const m = map.get(p.vessel) ?? { vessel: p.vessel, indices: [], hyperemicAgent: false, rows: 0 };
    m.rows += 1;
    m.hyperemicAgent ||= p.hyperemicAgent;
    for (const i of p.measured) if (!m.indices.includes(i)) m.indices.push(i);
    map.set(p.vessel, m);
  }
  for (const m of map.values()) m.indices.sort((a, b) => order.indexOf(a) - order.indexOf(b));
  // Vessels measured with a hyperaemic drug first: the first-vessel code then goes to one that meets the wording.
  return [...map.values()].sort((a, b) => Number(b.hyperemicAgent) - Number(a.hyperemicAgent));
}

const describe = (m: MeasuredVessel) => `the ${shortName(m.vessel)}`;
const indicesText = (list: MeasuredIndex[]) => listNames(list.map((i) => indexName[i]));

export function applyPhysiology(ctx: RuleContext): void {
  const vessels = measuredVessels(ctx);
  if (vessels.length === 0) return;

  for (const m of vessels) {
    if (m.rows > 1) {
      ctx.warn(physiologyRules.branchCounted, 'physiology-vessel-repeated', `${m.rows} measurement rows are recorded for the ${shortName(m.vessel)}; they were counted as one vessel. If they were different vessels (two diagonals, two grafts), add 93572 by hand.`);
    }
  }

  if (ctx.inpatientFacility) {
    const pressure = vessels.filter((m) => m.indices.includes('ffr') || m.indices.includes('nhpr'));
    const flow = vessels.filter((m) => m.indices.includes('cfr') || m.indices.includes('imr'));
    if (pressure.length) {
      ctx.emit(physiologyRules.pcsPressure, 'ICD-10-PCS', '4A033BC', {
        values: { vessels: listNames(pressure.map(describe)), indices: indicesText([...new Set(pressure.flatMap((m) => m.indices.filter((i) => i === 'ffr' || i === 'nhpr')))]) },
      });
    }
    if (flow.length) {
      ctx.emit(physiologyRules.pcsFlow, 'ICD-10-PCS', '4A0335C', {
        values: { vessels: listNames(flow.map(describe)), indices: indicesText([...new Set(flow.flatMap((m) => m.indices.filter((i) => i === 'cfr' || i === 'imr')))]) },
      });
    }
    return;
  }

  const [first, ...others] = vessels;
  ctx.emit(physiologyRules.first, 'CPT', '93571', { values: { first: describe(first), indices: indicesText(first.indices) } });
  if (others.length) {
    ctx.emit(physiologyRules.additional, 'CPT', '93572', { units: others.length, values: { others: listNames(others.map(describe)) } });
  }

  const resting = vessels.filter((m) => !m.hyperemicAgent);
  if (resting.length) {
    ctx.warn(
      physiologyRules.restingOnly,
      'resting-only-physiology',
      `No hyperaemic drug was given for ${listNames(resting.map(describe))} (${resting.map((m) => indicesText(m.indices)).join('; ')}). 93571/93572 describe measurement "including pharmacologically induced stress"; whether a resting-only ratio meets that wording is not settled [memory]. Check payer policy before reporting ${resting.length === vessels.length ? 'the physiology codes' : 'these vessels'}.`,
    );
  }

  const measured = new Set(vessels.map((m) => m.vessel));
  for (const m of vessels) {
    const a = anatomyOf(m.vessel);
    if (a.kind === 'branch' && measured.has(a.artery)) {
      ctx.warn(
        physiologyRules.branchCounted,
        'physiology-branch-counted',
        `The ${shortName(m.vessel)} is a branch of the ${shortName(a.artery)}, which was also measured; it was counted as an additional vessel for 93572. Check the payer's reading of "vessel" before reporting it.`,
      );
    }
  }
}
