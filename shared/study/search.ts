/**
 * What a person types in the worklist search, read the ways people write a patient: an MRN (any
 * case, whole or its first or last digits), an accession, a family name, "Family, Given" as the
 * lists print it ("ASTER, Ada" or "Aster, A."), or "Given Family".
 */
export interface NameGuess {
  family: string;
  given?: string;
}

export interface ParsedSearch {
  /** The text as an identifier: upper case, no inner spaces (MRNs and accessions). */
  id: string;
  /** Whether a part of an MRN is worth looking up (long enough to be selective). */
  partialId: boolean;
  /** Name readings to try, lower case, each a prefix. */
  names: NameGuess[];
}

const clean = (s: string) => s.toLowerCase().replace(/\.+$/, '').replace(/\./g, ' ').replace(/\s+/g, ' ').trim();

export function parseSearch(text: string): ParsedSearch {
  const t = text.trim();
  const id = t.replace(/\s+/g, '').toUpperCase();
  const names: NameGuess[] = [];
  if (t.includes(',')) {
    const [family, ...rest] = t.split(',');
    const f = clean(family);
    const g = clean(rest.join(' '));
    if (f) names.push(g ? { family: f, given: g } : { family: f });
  } else {
    const words = clean(t).split(' ').filter(Boolean);
    if (words.length === 1) names.push({ family: words[0] }, { family: '', given: words[0] });
    for (let i = 1; i < words.length; i++) {
      const head = words.slice(0, i).join(' ');
      const tail = words.slice(i).join(' ');
      names.push({ family: tail, given: head }, { family: head, given: tail });
    }
    // A family name written with spaces ("van der Berg").
    if (words.length > 1) names.push({ family: words.join(' ') });
  }
  // Digits or a hyphen make the text a possible part of an MRN or accession ("MRN-FBBE", "7731").
  return { id, partialId: /^[A-Z0-9-]{3,}$/.test(id) && /[\d-]/.test(id), names };
}
