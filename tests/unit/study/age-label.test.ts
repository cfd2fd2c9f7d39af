import { describe, expect, it } from 'vitest';
import { ageLabel } from '../../../shared/study/awaiting-signature';

// How long a study has waited, as lists show it (common practice: minutes, hours, then days).
describe('ageLabel', () => {
  it.each([
    [0, '0 min'],
    [0.75, '45 min'],
    [0.999, '59 min'],
    [1, '1 h'],
    [23.9, '23 h'],
    [24, '1 d'],
    [27.5, '1 d 3 h'],
    [24 * 6 + 23, '6 d 23 h'],
    [24 * 7 + 5, '7 d'],
    [24 * 30, '30 d'],
  ])('%s h → %s', (hours, label) => expect(ageLabel(hours)).toBe(label));
  it('no value, no age', () => {
    expect(ageLabel(Number.NaN)).toBe('—');
    expect(ageLabel(-1)).toBe('—');
  });
});
