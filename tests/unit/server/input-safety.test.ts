import { describe, expect, it } from 'vitest';
import { findProblems, problemOfText } from '../../../server/http/input-safety';

describe('problemOfText', () => {
  it('accepts ordinary text, emoji (a valid surrogate pair) and real instants', () => {
    for (const ok of ['Lindqvist', 'Ödegaard 😀', '2024-02-29T10:00:00Z', '2025-03-01T08:00:00+14:00', '2025-03-01T08:00:00-12:00', '1900-01-01']) {
      expect(problemOfText(ok)).toBeNull();
    }
  });

  it('refuses NUL (PostgreSQL text cannot hold U+0000: PostgreSQL 15 docs §8.3) and unpaired surrogates (Unicode §3.9 D91)', () => {
    expect(problemOfText('a\u0000b')).toMatch(/NUL/);
    expect(problemOfText('a\ud800b')).toMatch(/surrogate/);
    expect(problemOfText('\udc00')).toMatch(/surrogate/);
  });

  it('refuses instants that cannot exist', () => {
    expect(problemOfText('0000-01-01T00:00:00Z')).toMatch(/year/); // PostgreSQL has no year 0 (docs §8.5)
    expect(problemOfText('2023-02-29T10:00:00Z')).toMatch(/28 days/); // 2023 is not a leap year (Gregorian rule)
    expect(problemOfText('2025-03-01T24:30:00Z')).toMatch(/time of day/);
    // IANA tz database: no zone is further than UTC−12:00 (Etc/GMT+12) or UTC+14:00 (Pacific/Kiritimati).
    expect(problemOfText('2025-03-01T08:00:00-23:59')).toMatch(/offset/);
    expect(problemOfText('2025-03-01T08:00:00+14:01')).toMatch(/offset/);
    expect(problemOfText('2025-03-01T08:00:00-12:30')).toMatch(/offset/);
  });
});

describe('findProblems', () => {
  it('names each problem by its JSON pointer (RFC 6901), keys included, ~ and / escaped', () => {
    const problems = findProblems({ a: ['ok', 'x\u0000'], 'b/c~': '0000-01-01T00:00:00Z', ['k\u0000']: 1 }, []);
    expect(problems.map((p) => p.pointer).sort()).toEqual(['/a/1', '/b~1c~0', '/k\u0000'].sort());
  });

  it('walks a deeply nested body without exhausting the stack', () => {
    let deep: unknown = 'x\u0000';
    for (let i = 0; i < 20_000; i++) deep = [deep];
    expect(findProblems(deep, [])).toHaveLength(1);
  });
});
