import { describe, expect, it } from 'vitest';
import { parseSearch } from '../../../shared/study/search';

// How people write a patient's name in lists: "FAMILY, Given" (common practice in hospital lists).
describe('parseSearch', () => {
  it.each([
    ['Aster, A.', [{ family: 'aster', given: 'a' }]],
    ['ASTER, Ada', [{ family: 'aster', given: 'ada' }]],
    ['van der Berg, Anna', [{ family: 'van der berg', given: 'anna' }]],
  ])('reads %s as family, given', (text, names) => {
    expect(parseSearch(text).names).toEqual(names);
  });

  it('reads "First Last" both ways, and one word as either name', () => {
    expect(parseSearch('Ada Aster').names).toEqual([
      { family: 'aster', given: 'ada' },
      { family: 'ada', given: 'aster' },
      { family: 'ada aster' },
    ]);
    expect(parseSearch('aster').names).toEqual([{ family: 'aster' }, { family: '', given: 'aster' }]);
  });

  it.each([
    ['mrn-100234', 'MRN-100234', true],
    ['0234', '0234', true],
    ['02', '02', false],
    ['Aster', 'ASTER', false],
    // An MRN's letters-only prefix, hyphen included, is still an MRN (a random test MRN found it).
    ['MRN-FBBE', 'MRN-FBBE', true],
  ])('reads %s as the identifier %s (part of an MRN: %s)', (text, id, partial) => {
    expect(parseSearch(text)).toMatchObject({ id, partialId: partial });
  });
});
