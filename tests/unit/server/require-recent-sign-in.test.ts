import { describe, expect, it } from 'vitest';
import { ReauthenticationRequiredError } from '../../../server/reports/errors';
import { requireRecentSignIn } from '../../../server/reports/require-recent-sign-in';

// Signing asks for a recent confirmation of identity at the provider; how recent is the lab's setting
// (SIGN_REAUTH_MINUTES). The limits below are arbitrary test inputs, not recommended values.
const now = Date.parse('2026-03-11T10:00:00Z');
const minutesAgo = (m: number) => now - m * 60_000;

describe('requireRecentSignIn', () => {
  it('lets a sign-in within the limit sign, the limit itself included', () => {
    expect(() => requireRecentSignIn({ authenticatedAt: minutesAgo(3) }, 10, '/studies/x/report', now)).not.toThrow();
    expect(() => requireRecentSignIn({ authenticatedAt: minutesAgo(10) }, 10, '/studies/x/report', now)).not.toThrow();
  });

  it('asks again after the limit, returning to the given page', () => {
    let caught: unknown;
    try {
      requireRecentSignIn({ authenticatedAt: minutesAgo(10) - 1 }, 10, '/studies/abc/report', now);
    } catch (e) {
      caught = e;
    }
    expect(caught).toBeInstanceOf(ReauthenticationRequiredError);
    expect((caught as ReauthenticationRequiredError).reauthenticateUrl).toBe('/api/auth/sign-in?reauth=1&returnTo=%2Fstudies%2Fabc%2Freport');
    expect((caught as Error).message).toContain('10 minutes');
  });

  it('asks again when the provider did not say when the person authenticated', () => {
    expect(() => requireRecentSignIn({}, 10, '/studies/x/report', now)).toThrow(ReauthenticationRequiredError);
  });
});
