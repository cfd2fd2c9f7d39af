import { describe, expect, it } from 'vitest';
import { bigintIdPattern, decodeKeysetCursor, encodeKeysetCursor, InvalidCursorError, uuidIdPattern } from '../../../server/db/keyset-cursor';
import { httpErrorOf } from '../../../server/http/domain-errors';
import { toProblem } from '../../../server/http/problem';

// Timestamps as PostgreSQL prints timestamptz in its ISO output style ("1997-12-17 07:37:16-08",
// microseconds optional): PostgreSQL documentation, 8.5.2 "Date/Time Output".
const forge = (value: unknown) => Buffer.from(JSON.stringify(value)).toString('base64url');
const uuid = '3f2504e0-4f89-41d3-9a0c-0305e82c3301'; // 8-4-4-4-12 hex layout of RFC 9562

describe('keyset cursor', () => {
  it('gives back exactly what it encoded, microseconds and offset included', () => {
    const at = '2026-03-04 23:30:00.123456+01';
    expect(decodeKeysetCursor(encodeKeysetCursor(at, uuid), uuidIdPattern)).toEqual({ at, id: uuid });
    expect(decodeKeysetCursor(encodeKeysetCursor('2026-03-04 23:30:00+05:30', '42'), bigintIdPattern)).toEqual({ at: '2026-03-04 23:30:00+05:30', id: '42' });
  });

  it('is opaque base64url text (RFC 4648 §5 alphabet), safe in a query string', () => {
    expect(encodeKeysetCursor('2026-03-04 23:30:00+00', uuid)).toMatch(/^[A-Za-z0-9_-]+$/);
  });

  it('refuses impossible instants that are well formed', () => {
    const impossible = [
      '2025-02-30 10:00:00+00', // February has 28 days in a common year (Gregorian calendar, ISO 8601-1:2019 [memory])
      '2024-02-30 10:00:00+00', // and 29 in a leap year
      '2025-04-31 10:00:00+00', // April has 30 days
      '2025-13-01 10:00:00+00', // months are 01–12
      '2025-01-01 24:00:00+00', // hours are 00–23 (ISO 8601-1:2019 [memory]; PostgreSQL never prints 24:00)
      '2025-01-01 25:00:00+00',
      '2025-01-01 10:60:00+00', // minutes are 00–59
    ];
    for (const at of impossible) expect(() => decodeKeysetCursor(forge([at, uuid]), uuidIdPattern), at).toThrow(InvalidCursorError);
    // A real leap day passes (2024 is divisible by 4 and not by 100: Gregorian leap-year rule, ISO 8601-1:2019 [memory]).
    expect(decodeKeysetCursor(forge(['2024-02-29 10:00:00+00', uuid]), uuidIdPattern).at).toBe('2024-02-29 10:00:00+00');
  });

  it('refuses what it never issues: other shapes, other id kinds, garbage', () => {
    const bad = [
      'not-a-cursor',
      forge(['yesterday', uuid]),
      forge(['2025-01-01 10:00:00+00']),
      forge({ at: '2025-01-01 10:00:00+00', id: uuid }),
      forge(['2025-01-01 10:00:00+00', uuid.toUpperCase()]),
      forge(['2025-01-01 10:00:00+00', 42]),
    ];
    for (const cursor of bad) expect(() => decodeKeysetCursor(cursor, uuidIdPattern), cursor).toThrow(InvalidCursorError);
    expect(() => decodeKeysetCursor(forge(['2025-01-01 10:00:00+00', '-1']), bigintIdPattern)).toThrow(InvalidCursorError);
    expect(() => decodeKeysetCursor(forge(['2025-01-01 10:00:00+00', uuid]), bigintIdPattern)).toThrow(InvalidCursorError);
  });

  it('is answered as a client error naming the cursor (400: RFC 9110 §15.5.1)', () => {
    let thrown: unknown;
    try {
      decodeKeysetCursor(forge(['2025-02-30 10:00:00+00', uuid]), uuidIdPattern);
    } catch (error) {
      thrown = error;
    }
    const http = httpErrorOf(thrown);
    expect(http?.status).toBe(400);
    const problem = toProblem(http!, '/api/studies');
    expect(problem.errors?.[0]?.pointer).toBe('/cursor');
  });
});
