import { CODING_CAUTION } from './codes';
import { chooseCodeSets } from './code-sets';
import { cathRules, applyCath } from './rules/cath';
import { diagnosisRules, applyDiagnoses } from './rules/diagnoses';
import { pciRules, applyPci } from './rules/pci';
import { physiologyRules, applyPhysiology } from './rules/physiology';
import { RuleContext, type Rule } from './rules/rule';
import {
  sessionRules,
  applyAddOnPrimary,
  applyCathWithPci,
  applyCodeSetYear,
  applyEncounter,
  applyInpatientFacility,
  applyProvocation,
} from './rules/session';
import { codingInputSchema, type CodingInput, type CodingResult, type SuggestedCode } from './schema';


/** Every rule, by id: what a coder or an admin can read about why a code was suggested. */
export { CODING_CAUTION };

export const rules: readonly Rule[] = Object.freeze([
  ...Object.values(sessionRules),
  ...Object.values(cathRules),
  ...Object.values(pciRules),
  ...Object.values(physiologyRules),
  ...Object.values(diagnosisRules),
]);
export const ruleById: ReadonlyMap<string, Rule> = new Map(rules.map((r) => [r.id, r]));

const systemOrder: Record<SuggestedCode['system'], number> = { CPT: 0, HCPCS: 1, 'ICD-10-PCS': 2, 'ICD-10-CM': 3 };

/**
 * Suggest procedure and diagnosis codes for one catheterization session, each with the rule that
 * produced it and a rationale, plus the warnings a coder must see. Throws the `ZodError` of
 * `codingInputSchema` on bad input.
 */
export function suggestCodes(input: CodingInput): CodingResult {
  const data = codingInputSchema.parse(input);
  const ctx = new RuleContext(data, chooseCodeSets(data.dateOfService));

  applyEncounter(ctx);
  applyCath(ctx);
  applyPci(ctx);
  applyPhysiology(ctx);
  applyDiagnoses(ctx);
  applyInpatientFacility(ctx);
  applyCathWithPci(ctx);
  applyProvocation(ctx);
  applyAddOnPrimary(ctx);
  applyCodeSetYear(ctx);
  for (const n of data.notes ?? []) ctx.warn(null, n.code, n.message, n.blocking === true);

  // Procedures before diagnoses, primaries before add-ons; otherwise the order the rules ran in.
  const codes = ctx.codes
    .map((c, i) => ({ c, i }))
    .sort((a, b) => systemOrder[a.c.system] - systemOrder[b.c.system] || Number(a.c.addOn) - Number(b.c.addOn) || a.i - b.i)
    .map(({ c }) => c);
  return { codes, warnings: ctx.warnings, codeSets: ctx.codeSets, caution: CODING_CAUTION };
}
