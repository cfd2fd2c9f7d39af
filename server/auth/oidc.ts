import * as oidc from 'openid-client';
import type { Config } from '../config';
import { isRole, type Role } from '../../shared/auth/permissions';

/** The identity provider as Isobar sees it: discovered once, then reused. */
export interface IdentityProvider {
  /**
   * `reauthenticate` asks the provider to confirm who the user is again, whatever session it holds
   * (OpenID Connect Core 1.0 §3.1.2.1: `prompt=login` and `max_age=0`).
   */
  authorizationUrl(params: { redirectUri: string; state: string; nonce: string; codeChallenge: string; reauthenticate?: boolean }): Promise<URL>;
  exchange(callbackUrl: URL, expected: { state: string; nonce: string; codeVerifier: string }): Promise<{ claims: Record<string, unknown>; idToken?: string }>;
  /** Where to send the browser to end the provider's session too, when the provider supports it. */
  endSessionUrl(params: { idToken?: string; postLogoutRedirectUri: string }): Promise<URL | null>;
  issuer: string;
}

export function identityProvider(config: Config['oidc']): IdentityProvider {
  let discovered: Promise<oidc.Configuration> | null = null;
  const configuration = () => {
    // Discovery waits for the first sign-in, so the server can start before the provider;
    // a failed discovery is retried at the next sign-in instead of being cached.
    discovered ??= oidc
      .discovery(new URL(config.issuer), config.clientId, config.clientSecret, undefined, {
        execute: config.issuer.startsWith('http:') ? [oidc.allowInsecureRequests] : [],
        timeout: 5,
      })
      .catch((error) => {
        discovered = null;
        throw error;
      });
    return discovered;
  };
  return {
    issuer: config.issuer,
    async authorizationUrl({ redirectUri, state, nonce, codeChallenge, reauthenticate }) {
      return oidc.buildAuthorizationUrl(await configuration(), {
        redirect_uri: redirectUri,
        scope: config.scope,
        state,
        nonce,
        code_challenge: codeChallenge,
        code_challenge_method: 'S256',
        ...(reauthenticate ? { prompt: 'login', max_age: '0' } : {}),
      });
    },
    async exchange(callbackUrl, expected) {
      const tokens = await oidc.authorizationCodeGrant(await configuration(), callbackUrl, {
        pkceCodeVerifier: expected.codeVerifier,
        expectedState: expected.state,
        expectedNonce: expected.nonce,
        idTokenExpected: true,
      });
      return { claims: { ...(tokens.claims() ?? {}) }, idToken: tokens.id_token };
    },
    async endSessionUrl({ idToken, postLogoutRedirectUri }) {
      const c = await configuration().catch(() => null);
      if (!c?.serverMetadata().end_session_endpoint) return null;
      return oidc.buildEndSessionUrl(c, {
        post_logout_redirect_uri: postLogoutRedirectUri,
        ...(idToken ? { id_token_hint: idToken } : {}),
      });
    },
  };
}

/**
 * When the provider last authenticated the user (ms), from the ID token's `auth_time` (seconds since
 * the epoch, OpenID Connect Core 1.0 §2), or null when the token does not say.
 */
export function authTimeOf(claims: Record<string, unknown>): number | null {
  const t = claims.auth_time;
  return typeof t === 'number' && Number.isFinite(t) && t > 0 ? t * 1000 : null;
}

export const pkce = {
  verifier: () => oidc.randomPKCECodeVerifier(),
  challenge: (verifier: string) => oidc.calculatePKCECodeChallenge(verifier),
  state: () => oidc.randomState(),
  nonce: () => oidc.randomNonce(),
};

/**
 * The Isobar role from the provider's groups claim, through the configured table.
 * Several matches: the first in the table's order wins. None: no role (the no-access page).
 */
export function mapRole(claim: unknown, roleMap: Record<string, Role>): Role | null {
  const groups = Array.isArray(claim) ? claim.map(String) : typeof claim === 'string' ? claim.split(/[\s,]+/) : [];
  for (const [group, role] of Object.entries(roleMap)) {
    if (groups.includes(group) && isRole(role)) return role;
  }
  return null;
}
