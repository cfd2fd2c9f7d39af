import { describe, expect, it } from 'vitest';
import { dayLabel, formatDateTime, formatHours } from '../../components/format';

describe('worklist day headings (local days; common practice)', () => {
  const now = new Date(2026, 11, 1, 9, 30); // 1 Dec 2026, 09:30 local time
  it.each([
    [new Date(2026, 11, 1, 0, 5), 'Today'],
    [new Date(2026, 11, 1, 23, 59), 'Today'],
    [new Date(2026, 10, 30, 23, 59), 'Yesterday'],
    [new Date(2026, 10, 30, 0, 0), 'Yesterday'],
    [new Date(2026, 10, 29, 12, 0), 'Sun, 29 Nov 2026'],
  ])('%s → %s', (when, label) => {
    expect(dayLabel(when.toISOString(), now)).toBe(label);
  });
  it('says when no time was recorded', () => {
    expect(dayLabel(null, now)).toBe('Time not recorded');
  });
});

describe('hours waiting', () => {
  it.each([
    [0.5, '30 min'],
    [30, '30.0 h'],
    [50, '2 d 2 h'],
  ])('%s h → %s', (h, text) => {
    expect(formatHours(h)).toBe(text);
  });
});

describe('date and time of a study (local time; common practice)', () => {
  it('reads day, month, year and the 24-hour time', () => {
    expect(formatDateTime(new Date(2026, 11, 1, 9, 5).toISOString())).toBe('01 Dec 2026, 09:05');
    expect(formatDateTime(new Date(2026, 0, 31, 23, 59).toISOString())).toBe('31 Jan 2026, 23:59');
  });
  it('says when no time was recorded', () => {
    expect(formatDateTime(null)).toBe('not recorded');
  });
});
