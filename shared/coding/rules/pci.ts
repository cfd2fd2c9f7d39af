import type { InterventionKind, PciEntry, StentType, VesselCode } from '../schema';
import { anatomyOf, arteryModifier, listNames, shortName, type MajorArtery } from '../vessels';
import type { Rule, RuleContext } from './rule';

const SRC = 'CPT coronary intervention guidelines 92920–92944: one base code per major coronary artery for its most intensive treatment, add-on codes for each additional branch, hierarchy atherectomy with stent > atherectomy > stent > balloon (AHIMA Code Write, February 2013)';
const MOD_SRC = 'HCPCS coronary artery modifiers LM, LD, LC, RC, RI [memory]';

export const pciRules = {
  major: {
    id: 'cpt.pci.artery',
    title: 'Coronary intervention: one base code per major coronary artery',
    system: 'CPT',
    source: `${SRC}; ${MOD_SRC}`,
    release: 'CPT 2025',
    rationale: '{what} is reported with one base code for the {territory} and its branches, given to the most intensive treatment there: {code}, with the {territory} modifier {modifier}.',
  },
  branch: {
    id: 'cpt.pci.branch',
    title: 'Coronary intervention: add-on code for each additional branch',
    system: 'CPT',
    source: `${SRC}; ${MOD_SRC}`,
    release: 'CPT 2025',
    rationale: '{what} is an additional branch of the {territory} treated in the same session, reported with the branch add-on {code} and the {territory} modifier {modifier}.',
  },
  graft: {
    id: 'cpt.pci.graft',
    title: 'Intervention through a coronary bypass graft',
    system: 'CPT',
    source: SRC,
    release: 'CPT 2025',
    rationale: '{what} through a bypass graft is reported with {code}, which covers any stent, atherectomy and angioplasty in the graft.',
  },
  outpatientStent: {
    id: 'hcpcs.pci.drug-eluting-stent',
    title: 'Hospital outpatient claim: drug-eluting stents reported with HCPCS C-codes',
    system: 'HCPCS',
    source: 'CMS hospital outpatient reporting of drug-eluting coronary stents with HCPCS C9600–C9608 instead of the CPT stent codes [memory]',
    release: 'HCPCS 2025',
    rationale: 'On a hospital outpatient facility claim a drug-eluting stent is reported with {code} in place of CPT {cpt}: {what}, modifier {modifier}.',
  },
  review: {
    id: 'review.pci',
    title: 'Coronary intervention details the rules cannot decide',
    system: 'review',
    source: SRC,
    release: 'CPT 2025',
    rationale: 'Intervention details outside what the study records.',
  },
} as const satisfies Record<string, Rule>;

const rank: Record<InterventionKind, number> = { balloon: 1, stent: 2, atherectomy: 3, 'atherectomy-stent': 4 };
const kindText: Record<InterventionKind, string> = {
  balloon: 'Balloon angioplasty',
  stent: 'Stent placement',
  atherectomy: 'Atherectomy',
  'atherectomy-stent': 'Atherectomy with stent placement',
};
const baseCode: Record<InterventionKind, string> = { balloon: '92920', stent: '92928', atherectomy: '92924', 'atherectomy-stent': '92933' };
const addOnCode: Record<InterventionKind, string> = { balloon: '92921', stent: '92929', atherectomy: '92925', 'atherectomy-stent': '92934' };
const hasStent = (k: InterventionKind) => k === 'stent' || k === 'atherectomy-stent';

/** One treated vessel after combining the entries recorded for it. */
interface Target {
  key: string;
  territory: MajorArtery | 'GRAFT';
  branch: boolean;
  vessel: VesselCode;
  kind: InterventionKind;
  stent: StentType | undefined;
  entries: PciEntry[];
}

function targetsOf(ctx: RuleContext): Target[] {
  const byKey = new Map<string, Target>();
  for (const e of ctx.input.pci) {
    const a = anatomyOf(e.vessel);
    let territory: Target['territory'];
    let branch: boolean;
    if (a.kind === 'graft') {
      territory = 'GRAFT';
      branch = e.branch === true;
    } else if (a.kind === 'branch') {
      territory = a.artery;
      branch = true;
    } else {
      territory = a.artery;
      branch = e.branch === true;
      if (branch && (a.artery === 'LM' || a.artery === 'RAMUS')) {
        ctx.warn(
          pciRules.review,
          'branch-not-recognised',
          `An intervention is recorded in a branch of the ${shortName(e.vessel)}, but the intervention codes recognise no branches of the left main or ramus intermedius; it was coded as the ${shortName(e.vessel)} itself. Check the report.`,
        );
        branch = false;
      }
    }
    const key = `${territory}/${branch ? e.vessel : 'main'}`;
    const t = byKey.get(key);
    if (!t) {
      byKey.set(key, { key, territory, branch, vessel: e.vessel, kind: e.kind, stent: e.stent, entries: [e] });
      continue;
    }
    t.entries.push(e);
    if (rank[e.kind] > rank[t.kind]) {
      t.kind = e.kind;
      t.stent = e.stent;
    }
    if (e.stent === 'drug-eluting' && hasStent(e.kind)) t.stent = 'drug-eluting';
  }
  for (const t of byKey.values()) {
    if (t.entries.length > 1) {
      const where = t.branch ? (t.vessel === 'GRAFT' ? 'a branch served by the bypass graft' : `a branch of the ${t.territory === 'GRAFT' ? 'graft' : shortName(t.territory)} (${shortName(t.vessel)})`) : t.territory === 'GRAFT' ? 'the bypass graft' : `the ${shortName(t.territory)}`;
      ctx.warn(
        pciRules.review,
        'pci-same-vessel-combined',
        `${t.entries.length} interventions are recorded in ${where}; they are reported once, by the most intensive (${kindText[t.kind].toLowerCase()}). If they were in different branches or grafts, add the add-on codes by hand.`,
      );
    }
  }
  return [...byKey.values()];
}

export function applyPci(ctx: RuleContext): void {
  const pci = ctx.input.pci;
  if (pci.length === 0) return;
  if (ctx.inpatientFacility) return; // procedures of an inpatient facility claim are ICD-10-PCS (see the session rule)

  const facilityOutpatient = ctx.input.billing === 'facility' && ctx.input.patientClass === 'outpatient' && ctx.input.setting === 'hospital';
  const targets = targetsOf(ctx);
  const territories = [...new Set(targets.map((t) => t.territory))];

  for (const territory of territories) {
    const group = targets
      .filter((t) => t.territory === territory)
      .sort((a, b) => rank[b.kind] - rank[a.kind] || Number(a.branch) - Number(b.branch));
    const modifier = territory === 'GRAFT' ? null : arteryModifier[territory];
    const territoryName = territory === 'GRAFT' ? 'bypass graft' : shortName(territory);
    if (territory !== 'GRAFT' && group.filter((t) => t.branch).length > 2) {
      ctx.warn(pciRules.review, 'more-than-two-branches', `${group.filter((t) => t.branch).length} branches of the ${territoryName} are recorded; the intervention codes recognise at most two branches per major artery [memory]. Check the report.`);
    }
    group.forEach((t, i) => {
      const first = i === 0;
      const vesselText = t.branch ? (t.vessel === t.territory || t.vessel === 'GRAFT' ? `a branch of the ${territoryName}` : `the ${shortName(t.vessel)}`) : `the ${territoryName}`;
      const what = `${kindText[t.kind]} in ${vesselText}`;
      let cpt: string;
      let rule: Rule;
      if (territory === 'GRAFT') {
        cpt = first ? '92937' : '92938';
        rule = pciRules.graft;
      } else {
        cpt = first ? baseCode[t.kind] : addOnCode[t.kind];
        rule = first ? pciRules.major : pciRules.branch;
      }
      const modifiers = modifier ? [modifier] : [];
      if (facilityOutpatient && hasStent(t.kind) && t.stent === 'drug-eluting') {
        const hcpcs = territory === 'GRAFT' ? (first ? 'C9604' : 'C9605') : t.kind === 'stent' ? (first ? 'C9600' : 'C9601') : first ? 'C9602' : 'C9603';
        ctx.emit(pciRules.outpatientStent, 'HCPCS', hcpcs, { modifiers, values: { cpt, what: what.toLowerCase(), modifier: modifier ?? 'none' } });
        return;
      }
      const whatText = first && t.branch && territory !== 'GRAFT' ? `${what} (the only or most intensive treatment there)` : what;
      ctx.emit(rule, 'CPT', cpt, { modifiers, values: { what: whatText, territory: territoryName, modifier: modifier ?? 'none' } });
    });
    if (facilityOutpatient && group.some((t) => hasStent(t.kind) && t.stent === undefined)) {
      ctx.warn(pciRules.outpatientStent, 'stent-type-not-recorded', `A stent in the ${territoryName} has no stent type recorded. On a hospital outpatient claim, Medicare reports drug-eluting stents with HCPCS C9600–C9608 instead of the CPT stent codes [memory]; record the stent type or code by hand.`);
    }
  }

  if (territories.includes('GRAFT')) {
    ctx.warn(pciRules.review, 'graft-intervention-check', 'An intervention through a bypass graft is coded once (92937) per graft; if more than one graft was treated, add 92937 for each, and add the coronary modifier of the artery each graft supplies if the payer asks for it [memory].');
  }
  const names = listNames([...new Set(pci.map((e) => shortName(e.vessel)))]);
  ctx.warn(
    pciRules.review,
    'pci-lesion-type',
    `Interventions in ${names} were coded as elective: an acute total or subtotal occlusion during myocardial infarction (92941) or a chronic total occlusion (92943) has its own higher-ranked code. Check the report for either.`,
  );
}
