import type { CodeSetChoice, CodeSystem, CodingResult } from './schema';

/**
 * The code-set releases these rules were written against. CPT and HCPCS releases run by calendar
 * year (1 January); ICD-10-CM and ICD-10-PCS by the US federal fiscal year, which starts on
 * 1 October of the year before (FY2026 = 1 Oct 2025 – 30 Sep 2026). A date of service outside these
 * releases is still coded with the nearest one, and the coder is warned.
 */
export const encodedReleases: Readonly<Record<CodeSystem, readonly number[]>> = Object.freeze({
  CPT: [2024, 2025],
  HCPCS: [2024, 2025],
  'ICD-10-CM': [2024, 2025, 2026],
  'ICD-10-PCS': [2024, 2025, 2026],
});

const fiscal = (s: CodeSystem) => s === 'ICD-10-CM' || s === 'ICD-10-PCS';

export function releaseLabel(system: CodeSystem, year: number): string {
  return fiscal(system) ? `${system} FY${year}` : `${system} ${year}`;
}

/** The release a date of service (YYYY-MM-DD) falls in. */
export function releaseOf(system: CodeSystem, date: string): number {
  const year = Number(date.slice(0, 4));
  const month = Number(date.slice(5, 7));
  return fiscal(system) && month >= 10 ? year + 1 : year;
}

/** The first and last day a release applies to. */
export function releaseSpan(system: CodeSystem, year: number): { from: string; to: string } {
  return fiscal(system) ? { from: `${year - 1}-10-01`, to: `${year}-09-30` } : { from: `${year}-01-01`, to: `${year}-12-31` };
}

export type CodeSets = CodingResult['codeSets'];

/** The releases to apply for a date of service (or the latest encoded ones without a date). */
export function chooseCodeSets(dateOfService: string | null | undefined): CodeSets {
  const pick = (system: CodeSystem): CodeSetChoice => {
    const years = encodedReleases[system];
    const first = years[0];
    const last = years[years.length - 1];
    if (!dateOfService) return { year: last, label: releaseLabel(system, last), encoded: true };
    const wanted = releaseOf(system, dateOfService);
    const year = Math.min(Math.max(wanted, first), last);
    return { year, label: releaseLabel(system, year), encoded: years.includes(wanted) };
  };
  return {
    basis: dateOfService ? 'date-of-service' : 'latest-encoded',
    dateOfService: dateOfService ?? null,
    CPT: pick('CPT'),
    HCPCS: pick('HCPCS'),
    'ICD-10-CM': pick('ICD-10-CM'),
    'ICD-10-PCS': pick('ICD-10-PCS'),
  };
}
