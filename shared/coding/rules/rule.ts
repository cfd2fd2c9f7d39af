import { CODING_CAUTION, codeEntry } from '../codes';
import { releaseLabel, releaseOf, type CodeSets } from '../code-sets';
import type { CodeSystem, CodingData, CodingWarning, SuggestedCode } from '../schema';

/**
 * A rule is data a coder can read — a stable id, what it decides, its source, the code-set release
 * it reflects and a one-sentence rationale template — plus a small function that applies it.
 */
export interface Rule {
  id: string;
  title: string;
  /** The code system it suggests codes in; 'review' for rules that only warn. */
  system: CodeSystem | 'review';
  source: string;
  /** The code-set release it was written against, e.g. "CPT 2025". */
  release: string;
  /** One sentence; {placeholders} are filled from the case. */
  rationale: string;
}

const fill = (template: string, values: Record<string, string | number>) =>
  template.replace(/\{(\w+)\}/g, (m, k: string) => (k in values ? String(values[k]) : m));

/** A description inside a sentence: its first letter in lower case, unless it begins an abbreviation. */
const inSentence = (d: string) => (/^[A-Z][a-z]/.test(d) ? d[0].toLowerCase() + d.slice(1) : d);

/** What the rules share while they run over one input. */
export class RuleContext {
  readonly codes: SuggestedCode[] = [];
  readonly warnings: CodingWarning[] = [];

  constructor(
    readonly input: CodingData,
    readonly codeSets: CodeSets,
  ) {}

  /** Professional claim for work in a hospital: modifier 26 on codes with a professional component. */
  get professionalInHospital(): boolean {
    return this.input.billing === 'professional' && this.input.setting === 'hospital';
  }

  /** Inpatient facility claims code procedures in ICD-10-PCS, not CPT. */
  get inpatientFacility(): boolean {
    return this.input.billing === 'facility' && this.input.patientClass === 'inpatient';
  }

  /** Add a code line; identical lines (same code and modifiers) add their units together. */
  emit(rule: Rule, system: CodeSystem, code: string, o: { units?: number; modifiers?: string[]; values?: Record<string, string | number> } = {}): SuggestedCode | null {
    const entry = codeEntry(system, code);
    if (!entry) throw new Error(`Rule ${rule.id} emitted ${system} ${code}, which is not in the code table.`);
    const release = this.codeSets[system];
    // Judge existence by the release of the date of service itself, even when it is not encoded.
    const dated = this.input.dateOfService ? releaseOf(system, this.input.dateOfService) : release.year;
    if (dated < entry.since) {
      this.warn(rule, 'code-not-in-release', `${system} ${code} (${entry.description.toLowerCase()}) is not in ${releaseLabel(system, dated)}, the release for this date of service; it was first available in ${system === 'ICD-10-CM' || system === 'ICD-10-PCS' ? 'FY' : ''}${entry.since}. Code this by hand.`);
      return null;
    }
    const modifiers = [...(o.modifiers ?? [])];
    let rationale = fill(rule.rationale, { code, description: inSentence(entry.description), units: o.units ?? 1, ...(o.values ?? {}) });
    if (entry.professionalComponent && this.professionalInHospital && !modifiers.includes('26')) {
      modifiers.push('26');
      rationale = `${rationale.replace(/\.$/, '')}; modifier 26 because the physician bills the professional component of work done in a hospital.`;
    }
    const units = o.units ?? 1;
    const same = this.codes.find((c) => c.system === system && c.code === code && c.modifiers.join() === modifiers.join());
    if (same) {
      same.units += units;
      return same;
    }
    const line: SuggestedCode = {
      system,
      code,
      units,
      modifiers,
      ruleId: rule.id,
      rationale,
      description: entry.description,
      addOn: entry.addOn,
      codeSet: release.label,
      source: rule.source,
      caution: CODING_CAUTION,
    };
    this.codes.push(line);
    return line;
  }

  warn(rule: Rule | null, code: string, message: string, blocking = false): void {
    if (this.warnings.some((w) => w.code === code && w.message === message)) return;
    this.warnings.push({ code, message, ...(rule ? { ruleId: rule.id } : {}), ...(blocking ? { blocking: true } : {}) });
  }
}
