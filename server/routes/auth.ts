import rateLimit from 'express-rate-limit';
import type { RequestHandler } from 'express';
import type { DataSource } from 'typeorm';
import type { Config } from '../config';
import { homeOf, permissionsOf } from '../../shared/auth/permissions';
import type { Me } from '../../shared/auth/users';
import { auditContext } from '../audit/audit';
import { authTimeOf, mapRole, pkce, type IdentityProvider } from '../auth/oidc';
import { provisionUser } from '../auth/provision-user';
import { recordFailedSignIn, recordSignIn, recordSignOut } from '../auth/sign-in-events';
import { destroySession, regenerateSession, saveSession, sessionCookieName } from '../auth/session';
import type { ApiRoute } from '../http/routes';
import { HttpError } from '../http/problem';

/** Only same-site paths may be returned to after sign-in (no open redirects). */
function safeReturnPath(value: unknown): string | null {
  if (typeof value !== 'string' || !value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return null;
  if (value.startsWith('/api/')) return null;
  return value.slice(0, 500);
}

const pendingTtlMs = 10 * 60_000;
/**
 * A renewed confirmation counts when the provider authenticated the user no earlier than the request
 * for it, give or take this much: `auth_time` is in whole seconds and the two clocks may differ a little.
 */
const reauthClockSkewMs = 30_000;

export function authRoutes(deps: { config: Config; dataSource: DataSource; idp: IdentityProvider }): ApiRoute[] {
  const { config, dataSource, idp } = deps;
  const callbackUrl = `${config.publicUrl}/api/auth/callback`;
  const limiter: RequestHandler = rateLimit({
    windowMs: 60_000,
    limit: config.signInRateLimit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    // Without a configured proxy X-Forwarded-For is ignored on purpose; no need to warn about it.
    validate: { xForwardedForHeader: false },
    handler: (_req, _res, next) =>
      next(new HttpError(429, 'too-many-sign-in-attempts', 'Too many sign-in attempts', 'Wait a minute, then try again.')),
  });

  return [
    {
      method: 'get',
      path: '/auth/sign-in',
      access: 'public',
      summary: 'Start the authorization code flow with PKCE at the identity provider; `reauth=1` makes the provider ask again (to sign)',
      handlers: [
        limiter,
        async (req, res) => {
          const codeVerifier = pkce.verifier();
          const reauth = req.query.reauth === '1' || req.query.reauth === 'true';
          const pending = {
            state: pkce.state(),
            nonce: pkce.nonce(),
            codeVerifier,
            returnTo: safeReturnPath(req.query.returnTo),
            startedAt: Date.now(),
            ...(reauth ? { reauth: true } : {}),
          };
          let url: URL;
          try {
            url = await idp.authorizationUrl({
              redirectUri: callbackUrl,
              state: pending.state,
              nonce: pending.nonce,
              codeChallenge: await pkce.challenge(codeVerifier),
              reauthenticate: reauth,
            });
          } catch {
            res.redirect(303, '/sign-in?error=provider-unavailable');
            return;
          }
          req.session.pending = pending;
          await saveSession(req.session);
          res.redirect(303, url.href);
        },
      ],
    },
    {
      method: 'get',
      path: '/auth/callback',
      access: 'public',
      summary: 'Finish sign-in: exchange the code, provision the user, rotate the session',
      handlers: [
        limiter,
        async (req, res) => {
          const pending = req.session.pending;
          if (typeof req.query.error === 'string') {
            // The provider's error text comes from the address bar: anyone can write it. Keep a fixed code.
            await recordFailedSignIn(dataSource, auditContext(req), 'provider-error');
            res.redirect(303, '/sign-in?error=provider-refused');
            return;
          }
          if (!pending || Date.now() - pending.startedAt > pendingTtlMs) {
            await recordFailedSignIn(dataSource, auditContext(req), 'no-pending-sign-in');
            res.redirect(303, '/sign-in?error=expired');
            return;
          }
          let claims: Record<string, unknown>;
          let idToken: string | undefined;
          try {
            ({ claims, idToken } = await idp.exchange(new URL(req.originalUrl, config.publicUrl), pending));
          } catch {
            // The library's message may quote the provider's response; keep a fixed code only.
            await recordFailedSignIn(dataSource, auditContext(req), 'token-exchange-failed');
            res.redirect(303, '/sign-in?error=failed');
            return;
          }
          const subject = String(claims.sub);
          const authTime = authTimeOf(claims);
          const previous = req.session.auth;
          if (pending.reauth) {
            // A renewed confirmation must be one the provider has just made, for the same person.
            const fresh = authTime !== null && authTime >= pending.startedAt - reauthClockSkewMs;
            const samePerson = !previous || previous.subject === subject;
            if (!fresh || !samePerson) {
              delete req.session.pending;
              await saveSession(req.session);
              await recordFailedSignIn(dataSource, auditContext(req), fresh ? 'reauthentication-other-user' : 'reauthentication-not-fresh');
              res.redirect(303, previous ? (pending.returnTo ?? '/') : '/sign-in?error=failed');
              return;
            }
          }
          const role = mapRole(claims[config.oidc.roleClaim], config.oidc.roleMap);
          const email = typeof claims.email === 'string' ? claims.email : '';
          const displayName = typeof claims.name === 'string' && claims.name ? claims.name : email || subject;
          const user = await provisionUser(dataSource, { issuer: idp.issuer, subject, email, displayName, role });
          // A new session id at sign-in: an id planted before sign-in is worth nothing after it.
          await regenerateSession(req.session);
          const now = Date.now();
          // A renewed confirmation keeps the session's start (its absolute limit) and renews who-it-is.
          const continuing = pending.reauth && previous?.subject === subject;
          req.session.auth = {
            userId: user.id,
            subject,
            displayName,
            email,
            role,
            idToken,
            signedInAt: continuing ? previous.signedInAt : now,
            // Only the provider's own auth_time proves when the person last confirmed who they are: a
            // token without it (a silent single sign-on) leaves the field empty, and signing asks again.
            ...(authTime !== null ? { authenticatedAt: Math.min(authTime, now) } : {}),
          };
          await saveSession(req.session);
          await recordSignIn(dataSource, auditContext(req), user.id, { reauthentication: pending.reauth === true });
          res.redirect(303, pending.returnTo ?? (role ? homeOf[role] : '/'));
        },
      ],
    },
    {
      method: 'post',
      path: '/auth/sign-out',
      access: 'public',
      summary: 'End the session here, and tell the client where to end it at the provider',
      handlers: [
        async (req, res) => {
          const auth = req.session?.auth;
          let redirect = '/sign-in?signedOut=1';
          if (auth) {
            await recordSignOut(dataSource, auditContext(req), auth.userId);
            const end = await idp.endSessionUrl({ idToken: auth.idToken, postLogoutRedirectUri: `${config.publicUrl}/sign-in?signedOut=1` });
            if (end) redirect = end.href;
          }
          if (req.session) await destroySession(req.session);
          res.clearCookie(sessionCookieName, { path: '/', httpOnly: true, sameSite: 'lax', secure: config.session.secure });
          res.json({ redirect });
        },
      ],
    },
    {
      method: 'get',
      path: '/me',
      access: 'signed-in',
      summary: 'The signed-in user, their role and what it permits',
      handlers: [
        (req, res) => {
          const auth = req.session.auth!;
          const me: Me = {
            id: auth.userId,
            displayName: auth.displayName,
            email: auth.email,
            role: auth.role,
            permissions: permissionsOf(auth.role),
            home: auth.role ? homeOf[auth.role] : null,
            sessionExpiresAt: new Date(auth.signedInAt + config.session.maxHours * 3_600_000).toISOString(),
          };
          res.json(me);
        },
      ],
    },
  ];
}
