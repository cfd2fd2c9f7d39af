import type { Rule, RuleContext } from './rule';

const SRC = 'CPT diagnostic cardiac catheterization guidelines and descriptors 93451–93461 [memory, well known]';

export const cathRules = {
  coronary: {
    id: 'cpt.cath.coronary-angiography',
    title: 'Diagnostic catheterization with coronary angiography: one code for the combination done',
    system: 'CPT',
    source: SRC,
    release: 'CPT 2025',
    rationale: 'Coronary angiography was done {with}, which one code of the 93454–93461 family describes: {code} ({description}){lv}.',
  },
  heartOnly: {
    id: 'cpt.cath.heart-only',
    title: 'Heart catheterization without coronary angiography',
    system: 'CPT',
    source: SRC,
    release: 'CPT 2025',
    rationale: 'Heart catheterization without coronary angiography ({with}) is {code} ({description}){lv}.',
  },
  undecided: {
    id: 'review.cath.undecided',
    title: 'A recorded catheterization the family codes do not describe',
    system: 'review',
    source: SRC,
    release: 'CPT 2025',
    rationale: 'The catheterization codes need coronary angiography or a heart catheterization.',
  },
} as const satisfies Record<string, Rule>;

/** [coronary angiography codes by (left heart, right heart, graft)] */
const coronaryFamily: Record<string, string> = {
  'L0R0G0': '93454',
  'L0R0G1': '93455',
  'L0R1G0': '93456',
  'L0R1G1': '93457',
  'L1R0G0': '93458',
  'L1R0G1': '93459',
  'L1R1G0': '93460',
  'L1R1G1': '93461',
};

export function applyCath(ctx: RuleContext): void {
  const cath = ctx.input.cath;
  if (cath === null || ctx.inpatientFacility) return;
  const parts: string[] = [];
  if (cath.leftHeart) parts.push('left heart catheterization');
  if (cath.rightHeart) parts.push('right heart catheterization');
  if (cath.graftAngiography) parts.push('bypass graft angiography');
  const withText = parts.length ? `with ${parts.join(', ')}` : 'alone';
  const lv = cath.leftHeart && cath.leftVentriculography ? '; left ventriculography is included in it, not coded apart' : '';
  if (cath.coronaryAngiography) {
    const code = coronaryFamily[`L${+cath.leftHeart}R${+cath.rightHeart}G${+cath.graftAngiography}`];
    ctx.emit(cathRules.coronary, 'CPT', code, { values: { with: withText, lv } });
    return;
  }
  if (cath.graftAngiography) {
    ctx.warn(
      cathRules.undecided,
      'graft-angiography-without-coronary',
      'Bypass graft angiography is recorded without native coronary angiography; the catheterization codes that include graft angiography (93455, 93457, 93459, 93461) also include coronary angiography. Check the report and code by hand.',
    );
  }
  const heart = cath.leftHeart && cath.rightHeart ? '93453' : cath.leftHeart ? '93452' : cath.rightHeart ? '93451' : null;
  if (heart) {
    const w = [cath.leftHeart ? 'left' : '', cath.rightHeart ? 'right' : ''].filter(Boolean).join(' and ');
    ctx.emit(cathRules.heartOnly, 'CPT', heart, { values: { with: `${w} heart`, lv } });
  } else if (!cath.graftAngiography) {
    ctx.warn(cathRules.undecided, 'cath-nothing-recorded', 'A diagnostic catheterization is recorded with neither coronary angiography nor a heart catheterization ticked; no catheterization code was suggested. Check the study.');
  }
}
