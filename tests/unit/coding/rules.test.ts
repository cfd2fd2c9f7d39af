import { describe, expect, it } from 'vitest';
import { codeTable, encodedReleases, rules } from '../../../shared/coding';

/*
 * Rules are data a coder or an admin can read: a stable id, what the rule decides, where it comes
 * from, the code-set release it reflects and a one-sentence rationale template (product design,
 * common practice for auditable coding rules).
 */
describe('every rule is data with an id, a source, a release and a one-sentence rationale', () => {
  it('ids are unique and stable in form (system.family.name) — common practice', () => {
    const ids = rules.map((r) => r.id);
    expect(new Set(ids).size).toBe(ids.length);
    for (const id of ids) expect(id).toMatch(/^(cpt|hcpcs|pcs|icd10cm|review)\.[a-z0-9-]+(\.[a-z0-9-]+)?$/);
  });

  it.each(rules.map((r) => [r.id, r] as const))('%s names its source, release and rationale — common practice', (_id, r) => {
    expect(r.title.length).toBeGreaterThan(10);
    expect(r.source.length).toBeGreaterThan(20);
    // The release is one this engine encodes, e.g. "CPT 2025" or "ICD-10-CM FY2026".
    const releases = r.release.split('; ');
    for (const rel of releases) {
      const m = /^(CPT|HCPCS|ICD-10-CM|ICD-10-PCS) (?:FY)?(\d{4})$/.exec(rel);
      expect(m, rel).not.toBeNull();
      expect(encodedReleases[m![1] as keyof typeof encodedReleases]).toContain(Number(m![2]));
    }
    // One sentence: ends with a full stop and has no other sentence break.
    expect(r.rationale).toMatch(/\.$/);
    expect(r.rationale.slice(0, -1)).not.toMatch(/\.\s+[A-Z]/);
  });

  it('a value recalled from memory says so in the source — the project rule for unsourced values', () => {
    const memory = rules.filter((r) => /\[memory/.test(r.source)).map((r) => r.id);
    // The coronary artery modifiers and the catheterization family are from memory.
    expect(memory).toEqual(expect.arrayContaining(['cpt.pci.artery', 'cpt.pci.branch', 'cpt.cath.coronary-angiography', 'review.cath-with-pci']));
  });

  it('every code in the table has its own description (not the code set\'s descriptor) and a source — CPT descriptors are copyrighted (AMA)', () => {
    for (const c of codeTable) {
      expect(c.description.length, c.code).toBeGreaterThan(10);
      expect(c.source.length, c.code).toBeGreaterThan(10);
    }
  });
});
