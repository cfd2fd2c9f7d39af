import { describe, expect, it } from 'vitest';
import { pathOfPointer, pointerOf } from '../../../shared/http/problem';

// RFC 6901 (JSON Pointer) §3 and §5: "~" is written "~0" and "/" is written "~1"; "/a~1b" names the
// key "a/b", "/m~0n" the key "m~n".
describe('JSON pointers, one definition for server and client', () => {
  it('escapes as RFC 6901 §5 shows', () => {
    expect(pointerOf(['a/b'])).toBe('/a~1b');
    expect(pointerOf(['m~n'])).toBe('/m~0n');
    expect(pointerOf(['vessels', 0, 'restPa'])).toBe('/vessels/0/restPa');
  });

  it('reads a pointer back into the same path, row indexes as numbers', () => {
    for (const path of [['a/b'], ['m~n'], ['vessels', 0, 'restPa'], ['details', 'accessSite']]) {
      expect(pathOfPointer(pointerOf(path))).toEqual(path);
    }
  });
});
