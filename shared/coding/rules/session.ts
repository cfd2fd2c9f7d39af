import { codeEntry, pciAddOnPrimaries, physiologyPrimaryCodes } from '../codes';
import { encodedReleases, releaseLabel, releaseOf, releaseSpan } from '../code-sets';
import type { CodeSystem } from '../schema';
import { shortName } from '../vessels';
import type { Rule, RuleContext } from './rule';

export const sessionRules = {
  encounter: {
    id: 'review.encounter',
    title: 'Encounter not recorded: patient class, billing context, setting',
    system: 'review',
    source: 'Claim type decides the code systems: professional claims in a hospital carry modifier 26 on split codes; inpatient facility claims code procedures in ICD-10-PCS [memory]',
    release: 'CPT 2025',
    rationale: 'The encounter decides the code systems and modifiers.',
  },
  codeSetYear: {
    id: 'review.code-set-year',
    title: 'Date of service against the encoded code-set releases',
    system: 'review',
    source: 'CPT and HCPCS releases take effect on 1 January; ICD-10-CM and ICD-10-PCS on 1 October (CMS); CPT 2026 intervention changes as reported by coding publications summarising the release (not checked against the CPT 2026 code set)',
    release: 'CPT 2025; ICD-10-CM FY2026',
    rationale: 'Codes are valid for the release in force on the date of service.',
  },
  cathWithPci: {
    id: 'review.cath-with-pci',
    title: 'Diagnostic catheterization and coronary intervention in the same session',
    system: 'review',
    source: 'CPT coronary intervention guidelines and the CMS NCCI policy manual, chapter 11, on diagnostic angiography at the time of intervention [memory]',
    release: 'CPT 2025',
    rationale: 'Both may be reported only in set circumstances.',
  },
  provocation: {
    id: 'review.provocation',
    title: 'Vasoreactivity (provocation) testing: no automatic code',
    system: 'review',
    source: 'CPT 93463 is aimed at pulmonary vasoreactivity and is not reported with coronary interventions (coding article citing CPT); no dedicated code for acetylcholine testing was found in the code sets',
    release: 'CPT 2025',
    rationale: 'No code is suggested for provocation testing.',
  },
  inpatientProcedures: {
    id: 'review.inpatient-facility-procedures',
    title: 'Inpatient facility: catheterization and intervention procedure codes',
    system: 'review',
    source: 'ICD-10-PCS is the procedure code set of inpatient hospital claims (CMS)',
    release: 'ICD-10-PCS FY2026',
    rationale: 'Catheterization and intervention PCS codes are built by the coder.',
  },
  addOnPrimary: {
    id: 'review.add-on-primary',
    title: 'Add-on code without a primary procedure',
    system: 'review',
    source: 'CPT add-on codes ("list separately in addition to code for primary procedure") need their primary on the same claim; primaries of 93571/93572 per the code\'s parenthetical (93454–93461, 92920–92943) [list partly from memory]',
    release: 'CPT 2025',
    rationale: 'An add-on needs its primary.',
  },
} as const satisfies Record<string, Rule>;

export function applyEncounter(ctx: RuleContext): void {
  const { billing, setting, patientClass } = ctx.input;
  const missing = [
    patientClass === null ? 'patient class (outpatient or inpatient)' : null,
    billing === null ? 'billing context (professional or facility)' : null,
    setting === null ? 'setting (hospital or office)' : null,
  ].filter((x): x is string => x !== null);
  if (missing.length) {
    ctx.warn(
      sessionRules.encounter,
      'encounter-not-recorded',
      `The encounter is not recorded: ${missing.join(', ')}. Until it is, the professional-component modifier 26 is not applied and ICD-10-PCS codes for an inpatient facility claim are not suggested; record it in the study before completing the review.`,
      true,
    );
  }
  if (billing === 'facility' && setting === 'office') {
    ctx.warn(sessionRules.encounter, 'facility-in-office', 'A facility claim is recorded for work in an office; an office bills globally on the professional claim. Check the encounter.');
  }
  if (setting === 'office' && patientClass === 'inpatient') {
    ctx.warn(sessionRules.encounter, 'inpatient-in-office', 'An inpatient is recorded in an office setting. Check the encounter.');
  }
}

export function applyCodeSetYear(ctx: RuleContext): void {
  const date = ctx.input.dateOfService;
  if (date === null) {
    ctx.warn(sessionRules.codeSetYear, 'date-of-service-missing', `The study has no procedure date, so the latest encoded releases were used (${ctx.codeSets.CPT.label}, ${ctx.codeSets['ICD-10-CM'].label}). Check the codes against the release in force on the date of service.`);
    return;
  }
  if (date === undefined) return;
  const systems: CodeSystem[] = ['CPT', 'HCPCS', 'ICD-10-CM', 'ICD-10-PCS'];
  const used = new Set(ctx.codes.map((c) => c.system));
  const after: string[] = [];
  const before: string[] = [];
  for (const s of systems) {
    // CPT is always relevant (the claim type may still change); others when a code of theirs is suggested.
    if (s !== 'CPT' && s !== 'ICD-10-CM' && !used.has(s)) continue;
    const wanted = releaseOf(s, date);
    const years = encodedReleases[s];
    if (wanted > years[years.length - 1]) after.push(`${releaseLabel(s, wanted)} (encoded up to ${releaseLabel(s, years[years.length - 1])}, through ${releaseSpan(s, years[years.length - 1]).to})`);
    if (wanted < years[0]) before.push(`${releaseLabel(s, wanted)} (encoded from ${releaseLabel(s, years[0])}, from ${releaseSpan(s, years[0]).from})`);
  }
  if (after.length) {
    const pci = ctx.input.pci.length > 0 && releaseOf('CPT', date) > encodedReleases.CPT[encodedReleases.CPT.length - 1]
      ? ' Published summaries of the CPT 2026 release report new coronary intervention codes (complex stenting, chronic total occlusion), and one describes a redesign of the intervention family; these rules do not encode it, so check every intervention code against the CPT release in force.'
      : '';
    ctx.warn(
      sessionRules.codeSetYear,
      'code-set-after-encoded',
      `The date of service ${date} falls in ${after.join('; ')}, later than the releases these rules encode. The codes were suggested from the latest encoded release; verify each against the current code set.${pci}`,
    );
  }
  if (before.length) {
    ctx.warn(sessionRules.codeSetYear, 'code-set-before-encoded', `The date of service ${date} falls in ${before.join('; ')}, earlier than the releases these rules encode. Verify each code against the release in force on that date.`);
  }
}

export function applyInpatientFacility(ctx: RuleContext): void {
  if (!ctx.inpatientFacility) return;
  const parts = [ctx.input.cath !== null ? 'the diagnostic catheterization and angiography' : null, ctx.input.pci.length ? 'the coronary interventions (root operation dilation, by artery count and device)' : null].filter(Boolean);
  if (parts.length) {
    ctx.warn(sessionRules.inpatientProcedures, 'inpatient-pcs-not-built', `Inpatient facility claim: ${parts.join(' and ')} need ICD-10-PCS codes, which these rules do not build; code them from the report. Only the physiology measurement codes are suggested.`);
  }
}

export function applyCathWithPci(ctx: RuleContext): void {
  if (ctx.input.cath === null || ctx.input.pci.length === 0 || ctx.inpatientFacility) return;
  ctx.warn(
    sessionRules.cathWithPci,
    'cath-with-pci',
    'A diagnostic catheterization and a coronary intervention were done in the same session. The diagnostic codes may be reported with the intervention only when no prior diagnostic study is available and the decision to intervene rests on this one, when the prior study is inadequate, or when the patient\'s condition changed; they then may need a modifier (59, or XU for Medicare) [memory]. Otherwise the diagnostic angiography is part of the intervention.',
  );
}

export function applyProvocation(ctx: RuleContext): void {
  const v = ctx.input.vasoreactivity;
  if (v === null) return;
  ctx.warn(
    sessionRules.provocation,
    'provocation-no-code',
    `${v.agent === 'acetylcholine' ? 'Acetylcholine' : 'Ergonovine'} provocation testing in the ${shortName(v.vessel)}: no code was suggested. No code set has a dedicated code for coronary provocation testing; 93463 (drug given with haemodynamic measurement) is aimed at pulmonary vasoreactivity and is not reported with coronary interventions, and whether provocation testing qualifies for it is unsettled [memory]. Decide by hand with the payer's policy.`,
  );
}

/** Every add-on in the result has one of its primaries, or the coder is told. */
export function applyAddOnPrimary(ctx: RuleContext): void {
  const present = new Set(ctx.codes.map((c) => c.code));
  for (const c of ctx.codes) {
    if (!c.addOn) continue;
    const primaries = c.code === '93571' || c.code === '93572' ? [...physiologyPrimaryCodes] : (pciAddOnPrimaries[c.code] ?? []);
    if (primaries.some((p) => present.has(p))) continue;
    const entry = codeEntry(c.system, c.code);
    const why =
      c.code === '93571' || c.code === '93572'
        ? 'It is reported with a catheterization that includes coronary angiography (93454–93461) or a coronary intervention (92920–92943), and neither is recorded in this session'
        : 'Its base intervention code is not in this result';
    ctx.warn(sessionRules.addOnPrimary, 'add-on-without-primary', `${c.code} (${entry?.description.toLowerCase() ?? 'add-on'}) is an add-on code. ${why}: check whether the primary procedure was done and recorded, or whether it is billed on another claim.`);
  }
}
