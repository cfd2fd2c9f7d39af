import { describe, expect, it } from 'vitest';
import { problemSlugOf } from '../../../shared/http/problem';

// The product's own problem types (RFC 9457 §3.1.1: a URI naming the problem type), read by the client.
describe('problemSlugOf', () => {
  it('names a problem type of ours by its last part', () => {
    expect(problemSlugOf('https://isobar.example/problems/stale-version')).toBe('stale-version');
    expect(problemSlugOf('https://isobar.example/problems/reauthentication-required')).toBe('reauthentication-required');
  });
  it('knows nothing of another type, or of none', () => {
    expect(problemSlugOf('https://example.org/problems/out-of-credit')).toBeUndefined();
    expect(problemSlugOf('about:blank')).toBeUndefined();
    expect(problemSlugOf(undefined)).toBeUndefined();
  });
});
