import type { CodeSystem } from './schema';

/**
 * Format checks for a code a coder types or edits: the shape each code system allows, not whether
 * the code exists. Messages are written for the coder.
 */
const patterns: Readonly<Record<CodeSystem, { re: RegExp; rule: string; example: string }>> = Object.freeze({
  // CPT Category I: five digits; Category II: four digits and F; Category III: four digits and T.
  CPT: { re: /^(\d{5}|\d{4}[FT])$/, rule: 'five digits, or four digits followed by F or T', example: '93571' },
  // HCPCS Level II: a letter A–V followed by four digits.
  HCPCS: { re: /^[A-V]\d{4}$/, rule: 'a letter A–V followed by four digits', example: 'C9600' },
  // ICD-10-CM: a letter, a digit, a letter or digit; then optionally a point and one to four letters or digits.
  'ICD-10-CM': { re: /^[A-Z]\d[0-9A-Z](\.[0-9A-Z]{1,4})?$/, rule: 'a letter, a digit and a letter or digit, then optionally a point and up to four letters or digits', example: 'I25.10' },
  // ICD-10-PCS: exactly seven characters, digits and letters except I and O.
  'ICD-10-PCS': { re: /^[0-9A-HJ-NP-Z]{7}$/, rule: 'seven characters, digits or letters other than I and O', example: '4A033BC' },
});

/** A modifier: two characters, letters or digits (26, 59, LD, XU…). */
const modifierPattern = /^[0-9A-Z]{2}$/;

export interface FormatProblem {
  field: 'code' | 'modifiers' | 'units';
  message: string;
}

/** The format problem of a code in a system, or null when the code is well formed. */
export function checkCodeFormat(system: CodeSystem, code: string): FormatProblem | null {
  const p = patterns[system];
  if (typeof code !== 'string' || !p.re.test(code)) {
    return { field: 'code', message: `${system} codes are ${p.rule} (for example ${p.example}); "${String(code)}" is not.` };
  }
  return null;
}

/** Every problem of a code line as a coder might edit it: code, modifiers and units. */
export function checkCodeLine(line: { system: CodeSystem; code: string; modifiers: readonly string[]; units: number }): FormatProblem[] {
  const problems: FormatProblem[] = [];
  const code = checkCodeFormat(line.system, line.code);
  if (code) problems.push(code);
  const procedure = line.system === 'CPT' || line.system === 'HCPCS';
  if (!procedure && line.modifiers.length > 0) {
    problems.push({ field: 'modifiers', message: `${line.system} codes take no modifiers.` });
  }
  if (procedure) {
    for (const m of line.modifiers) {
      if (!modifierPattern.test(m)) problems.push({ field: 'modifiers', message: `A modifier is two letters or digits (for example 26 or LD); "${m}" is not.` });
    }
    if (new Set(line.modifiers).size !== line.modifiers.length) problems.push({ field: 'modifiers', message: 'A modifier is listed twice.' });
    if (line.modifiers.length > 4) problems.push({ field: 'modifiers', message: 'At most four modifiers per code line.' });
  }
  if (!Number.isInteger(line.units) || line.units < 1 || line.units > 99) {
    problems.push({ field: 'units', message: 'Units must be a whole number from 1 to 99.' });
  } else if (!procedure && line.units !== 1) {
    problems.push({ field: 'units', message: `${line.system} codes are reported once (units 1).` });
  }
  return problems;
}
