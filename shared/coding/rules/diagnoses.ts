import type { Rule, RuleContext } from './rule';

const TAB = 'CMS ICD-10-CM tabular list, categories I20 and I25 (FY2024 additions effective 1 October 2023)';
const GUIDE = 'ICD-10-CM Official Guidelines I.C.9.b: atherosclerotic heart disease with angina is coded with the I25.11- combination code, no separate I20 code; the I20 Excludes1 note names I25.1-';

export const diagnosisRules = {
  cadNoAngina: {
    id: 'icd10cm.cad-without-angina',
    title: 'Obstructive coronary disease without angina',
    system: 'ICD-10-CM',
    source: TAB,
    release: 'ICD-10-CM FY2026',
    rationale: 'The findings show obstructive coronary disease in a native artery and no angina is documented: {code} ({description}).',
  },
  cadAngina: {
    id: 'icd10cm.cad-with-angina',
    title: 'Obstructive coronary disease with angina: one combination code',
    system: 'ICD-10-CM',
    source: `${TAB}; ${GUIDE}`,
    release: 'ICD-10-CM FY2026',
    rationale: 'Obstructive coronary disease with angina{spasm} is one combination code, {code} ({description}), with no separate angina code.',
  },
  cmdWithCad: {
    id: 'icd10cm.cmd-with-cad',
    title: 'Microvascular dysfunction alongside obstructive disease',
    system: 'ICD-10-CM',
    source: `${TAB}; ${GUIDE}`,
    release: 'ICD-10-CM FY2026',
    rationale: 'Microvascular dysfunction was found as well as obstructive disease; the angina is carried by the I25.11- code (I20.81 is excluded with it), so the dysfunction is {code} ({description}).',
  },
  microvascularAngina: {
    id: 'icd10cm.microvascular-angina',
    title: 'Angina with coronary microvascular dysfunction, no obstructive disease',
    system: 'ICD-10-CM',
    source: TAB,
    release: 'ICD-10-CM FY2026',
    rationale: 'Angina with {evidence} and no obstructive disease: {code} ({description}).',
  },
  vasospasticAngina: {
    id: 'icd10cm.vasospastic-angina',
    title: 'Angina with documented epicardial spasm, no obstructive disease',
    system: 'ICD-10-CM',
    source: TAB,
    release: 'ICD-10-CM FY2026',
    rationale: 'Provocation testing documented epicardial coronary spasm with the patient\'s symptoms and no obstructive disease: {code} ({description}).',
  },
  cmdNoAngina: {
    id: 'icd10cm.cmd-without-angina',
    title: 'Chronic microvascular dysfunction without documented angina',
    system: 'ICD-10-CM',
    source: TAB,
    release: 'ICD-10-CM FY2026',
    rationale: 'Microvascular dysfunction was found without documented angina or obstructive disease: {code} ({description}).',
  },
  anginaNoCause: {
    id: 'icd10cm.angina-no-coronary-finding',
    title: 'Angina documented, no coronary abnormality found',
    system: 'ICD-10-CM',
    source: TAB,
    release: 'ICD-10-CM FY2026',
    rationale: 'Angina is documented but testing found no obstructive disease, microvascular dysfunction or spasm: {code} ({description}) as documented.',
  },
  chestPain: {
    id: 'icd10cm.chest-pain',
    title: 'No coronary diagnosis: the presenting symptom',
    system: 'ICD-10-CM',
    source: 'CMS ICD-10-CM tabular list, R07 [memory]; ICD-10-CM Official Guidelines section IV.D: code signs and symptoms when no definitive diagnosis is established (outpatient)',
    release: 'ICD-10-CM FY2026',
    rationale: 'No coronary abnormality or angina is documented; the presenting symptom is coded: {code} ({description}).',
  },
  review: {
    id: 'review.diagnoses',
    title: 'Diagnosis details the findings cannot decide',
    system: 'review',
    source: TAB,
    release: 'ICD-10-CM FY2026',
    rationale: 'Diagnosis specificity comes from the physician\'s documentation.',
  },
} as const satisfies Record<string, Rule>;

export function applyDiagnoses(ctx: RuleContext): void {
  const d = ctx.input.diagnoses;
  // COVADIS epicardial spasm requires the patient's usual symptoms to be reproduced, so it is coded as
  // angina with spasm even when angina is not recorded (warned). Microvascular spasm without recorded
  // angina is coded as the report words it: coronary microvascular dysfunction.
  const angina = d.angina || d.vasospasm === 'epicardial';
  const microvascular = d.microvascularDysfunction || d.vasospasm === 'microvascular';
  if (!d.angina && d.vasospasm === 'epicardial') {
    ctx.warn(diagnosisRules.review, 'spasm-without-angina', 'Coronary spasm is recorded but angina is not; spasm by the COVADIS criteria reproduces the patient\'s symptoms, so the spasm was coded as angina with spasm. Confirm with the physician\'s documentation.');
  }
  if (!d.angina && d.vasospasm === 'microvascular') {
    ctx.warn(diagnosisRules.review, 'spasm-without-angina', 'Microvascular spasm is recorded but angina is not; it was coded as coronary microvascular dysfunction (I25.85), as the report names it. If the physician documents angina, angina with coronary microvascular dysfunction (I20.81) applies.');
  }

  if (d.obstructiveCad) {
    if (!angina) {
      ctx.emit(diagnosisRules.cadNoAngina, 'ICD-10-CM', 'I25.10');
    } else if (d.vasospasm === 'epicardial') {
      ctx.emit(diagnosisRules.cadAngina, 'ICD-10-CM', 'I25.111', { values: { spasm: ' and documented spasm' } });
    } else {
      ctx.emit(diagnosisRules.cadAngina, 'ICD-10-CM', 'I25.119', { values: { spasm: '' } });
      ctx.warn(diagnosisRules.review, 'angina-type', 'Angina with coronary disease was coded as type not specified (I25.119). If the physician documents unstable (I25.110), refractory (I25.112) or stable or another form of angina (I25.118), use that code.');
    }
    if (microvascular) ctx.emit(diagnosisRules.cmdWithCad, 'ICD-10-CM', 'I25.85');
    const graft = ctx.input.cath?.graftAngiography === true || ctx.input.pci.some((p) => p.vessel === 'GRAFT') || ctx.input.physiology.some((p) => p.vessel === 'GRAFT');
    if (graft) ctx.warn(diagnosisRules.review, 'native-or-graft', 'The atherosclerosis codes suggested are for native coronary arteries; disease in a bypass graft or a transplanted heart is coded in I25.7- or I25.81- instead; the study involves a bypass graft, so check which applies.');
    return;
  }

  if (angina) {
    let coded = false;
    if (d.vasospasm === 'epicardial') {
      ctx.emit(diagnosisRules.vasospasticAngina, 'ICD-10-CM', 'I20.1');
      coded = true;
    }
    if (microvascular) {
      const evidence = [d.microvascularDysfunction ? 'coronary microvascular dysfunction on physiology testing' : null, d.vasospasm === 'microvascular' ? 'microvascular spasm on provocation testing' : null].filter(Boolean).join(' and ');
      ctx.emit(diagnosisRules.microvascularAngina, 'ICD-10-CM', 'I20.81', { values: { evidence } });
      coded = true;
    }
    if (!coded) {
      ctx.emit(diagnosisRules.anginaNoCause, 'ICD-10-CM', 'I20.9');
      ctx.warn(diagnosisRules.review, 'angina-without-finding', 'Angina is recorded but no coronary abnormality was found. Code what the physician concluded: angina (I20.9, or I20.89 for a specified form) or chest pain (R07.-) if angina was not confirmed.');
    }
    return;
  }

  if (microvascular) {
    ctx.emit(diagnosisRules.cmdNoAngina, 'ICD-10-CM', 'I25.85');
    return;
  }
  ctx.emit(diagnosisRules.chestPain, 'ICD-10-CM', 'R07.9');
  ctx.warn(diagnosisRules.review, 'chest-pain-reason', 'No coronary diagnosis follows from the findings; R07.9 was suggested for the presenting symptom. Code the reason for the test as the physician documented it.');
}
