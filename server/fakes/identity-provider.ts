import { generateKeyPairSync } from 'node:crypto';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import express from 'express';
import Provider, { errors, type Configuration, type KoaContextWithOIDC } from 'oidc-provider';
import { demoHospital, demoUsers } from '../demo/scenario';

/**
 * A stand-in for the hospital's identity provider, for local use and tests only: OpenID Connect
 * authorization code flow with PKCE, demo users with a `roles` claim, a sign-in page of our own,
 * and RP-initiated sign-out. Keys and grants live in memory and vanish when it stops.
 */
export interface FakeIdpOptions {
  port: number;
  host?: string;
  clientId: string;
  clientSecret: string;
  /** Isobar's public URL: its callback and post-sign-out pages are registered from it. */
  appUrl: string;
  password?: string;
  /**
   * Service clients (OAuth2 client credentials, no user): each gets JWT access tokens (RFC 9068) for
   * one resource server, e.g. Isobar's client for the EHR's FHIR endpoint.
   */
  serviceClients?: ServiceClient[];
  /**
   * For tests of the client only: behave like a provider that ignores a request to confirm the user
   * again (`prompt=login`, `max_age=0`) and answers at once from its existing session, reporting an
   * `auth_time` this many seconds ago. Unset (the default), such a request shows the sign-in form again.
   */
  staleReauthSeconds?: number;
}

export interface ServiceClient {
  clientId: string;
  clientSecret: string;
  /** The resource server (RFC 8707 resource indicator) the tokens are for, e.g. the EHR's FHIR base URL. */
  audience: string;
  /** The scopes the client may be granted there, space-separated. */
  scope: string;
}

export interface FakeIdp {
  issuer: string;
  server: Server;
  close(): Promise<void>;
}

type DemoUser = (typeof demoUsers)[number];

const escape = (s: string) => s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);

function page(title: string, body: string): string {
  return `<!doctype html><html lang="en"><head><meta charset="utf-8"><meta name="viewport" content="width=device-width,initial-scale=1">
<title>${escape(title)}</title><style>
body{margin:0;background:#F5F3EE;color:#14202B;font:16px/1.5 system-ui,sans-serif}
main{max-width:420px;margin:0 auto;padding:40px 20px}
h1{font-size:22px;margin:0 0 4px;color:#17324A}.org{color:#4A5866;margin:0 0 24px}
form{background:#fff;border:1px solid #D8D3C7;border-radius:14px;padding:20px;display:grid;gap:14px}
label{display:grid;gap:4px;font-weight:600}input{font:inherit;padding:10px 12px;border:1px solid #7A8794;border-radius:8px;min-height:24px}
button{font:inherit;font-weight:600;min-height:44px;border:0;border-radius:8px;background:#17324A;color:#fff;cursor:pointer}
.error{background:#F6DEDD;color:#A4262C;border-radius:8px;padding:8px 12px;margin:0}
.hint{font-size:13px;color:#4A5866}table{font-size:13px;border-collapse:collapse;width:100%}td{padding:2px 6px 2px 0}
</style></head><body><main>${body}</main></body></html>`;
}

function signInPage(uid: string, error?: string): string {
  const rows = demoUsers.map((u) => `<tr><td><code>${u.username}</code></td><td>${escape(u.displayName)}</td><td>${u.groups.join(', ')}</td></tr>`).join('');
  return page(
    'Hospital sign-in',
    `<h1>Hospital sign-in</h1><p class="org">${escape(demoHospital.name)} · local test identity service</p>
<form method="post" action="/interaction/${uid}/login" autocomplete="off">
${error ? `<p class="error" role="alert">${escape(error)}</p>` : ''}
<label>User name<input name="username" required autofocus autocapitalize="none" data-testid="idp-username"></label>
<label>Password<input name="password" type="password" required data-testid="idp-password"></label>
<button type="submit" data-testid="idp-submit">Sign in</button>
</form>
<p class="hint">Demo accounts (password <code>demo</code>):</p><table>${rows}</table>`,
  );
}

export async function startFakeIdp(options: FakeIdpOptions): Promise<FakeIdp> {
  const host = options.host ?? '127.0.0.1';
  const password = options.password ?? 'demo';
  const httpServer = createServer();
  await new Promise<void>((resolve) => httpServer.listen(options.port, host, resolve));
  const issuer = `http://${host}:${(httpServer.address() as AddressInfo).port}`;

  const { privateKey } = generateKeyPairSync('rsa', { modulusLength: 2048 });
  const jwk = { ...privateKey.export({ format: 'jwk' }), use: 'sig', alg: 'RS256', kid: 'fake-idp-1' };
  const services = options.serviceClients ?? [];
  const findUser = (id: string): DemoUser | undefined => demoUsers.find((u) => u.subject === id);

  const configuration: Configuration = {
    clients: [
      {
        client_id: options.clientId,
        client_secret: options.clientSecret,
        client_name: 'Isobar',
        redirect_uris: [`${options.appUrl}/api/auth/callback`],
        post_logout_redirect_uris: [`${options.appUrl}/sign-in?signedOut=1`],
        grant_types: ['authorization_code'],
        response_types: ['code'],
        token_endpoint_auth_method: 'client_secret_basic',
        // Every ID token says when the user was last authenticated: Isobar asks for a recent one to sign.
        require_auth_time: true,
      },
      ...services.map((s) => ({
        client_id: s.clientId,
        client_secret: s.clientSecret,
        client_name: `service client for ${s.audience}`,
        redirect_uris: [],
        grant_types: ['client_credentials'],
        response_types: [],
        token_endpoint_auth_method: 'client_secret_basic' as const,
      })),
    ],
    jwks: { keys: [jwk as never] },
    cookies: { keys: ['fake-idp-local-cookie-key-0123456789'] },
    pkce: { required: () => true },
    scopes: ['openid', 'profile', 'email', 'roles'],
    claims: { openid: ['sub'], profile: ['name'], email: ['email', 'email_verified'], roles: ['roles'] },
    conformIdTokenClaims: false,
    findAccount: async (_ctx, id) => {
      const user = findUser(id);
      if (!user) return undefined;
      return {
        accountId: id,
        claims: async () => ({ sub: id, name: user.displayName, email: user.email, email_verified: true, roles: [...user.groups] }),
      };
    },
    interactions: { url: (_ctx, interaction) => `/interaction/${interaction.uid}` },
    features: {
      devInteractions: { enabled: false },
      clientCredentials: { enabled: true },
      // A service client's tokens are JWTs for its one resource server, which checks them itself.
      resourceIndicators: {
        enabled: true,
        defaultResource: async (_ctx, client, oneOf) => oneOf ?? services.find((s) => s.clientId === client.clientId)?.audience,
        useGrantedResource: async () => false,
        getResourceServerInfo: async (_ctx, resource, client) => {
          const service = services.find((s) => s.clientId === client.clientId && s.audience === resource);
          if (!service) throw new errors.InvalidTarget();
          return { scope: service.scope, audience: service.audience, accessTokenFormat: 'jwt', accessTokenTTL: 300, jwt: { sign: { alg: 'RS256' } } };
        },
      },
      rpInitiatedLogout: {
        enabled: true,
        // Sign-out needs no second confirmation here: the user already chose it in Isobar.
        logoutSource: async (ctx: KoaContextWithOIDC, form: string) => {
          ctx.body = page(
            'Signing out',
            `${form}<p>Signing out…</p><noscript><button form="op.logoutForm" name="logout" value="yes">Sign out</button></noscript>
<script>var f=document.getElementById('op.logoutForm');var i=document.createElement('input');i.type='hidden';i.name='logout';i.value='yes';f.appendChild(i);f.submit();</script>`,
          );
        },
        postLogoutSuccessSource: async (ctx: KoaContextWithOIDC) => {
          ctx.body = page('Signed out', '<h1>Signed out</h1><p>You have signed out of the hospital identity service.</p>');
        },
      },
    },
    renderError: async (ctx, out) => {
      ctx.type = 'html';
      ctx.body = page('Sign-in problem', `<h1>Sign-in problem</h1><p class="error">${escape(String(out.error_description ?? out.error))}</p>`);
    },
    ttl: { Session: 8 * 3600, Grant: 8 * 3600, Interaction: 600, AuthorizationCode: 60, AccessToken: 3600, IdToken: 3600, ClientCredentials: 300 },
  };
  const provider = new Provider(issuer, configuration);

  const app = express();
  app.disable('x-powered-by');
  app.get('/interaction/:uid', async (req, res, next) => {
    try {
      const details = await provider.interactionDetails(req, res);
      if (details.prompt.name === 'login' && options.staleReauthSeconds !== undefined && details.session?.accountId) {
        const ts = Math.floor(Date.now() / 1000) - options.staleReauthSeconds;
        await provider.interactionFinished(req, res, { login: { accountId: details.session.accountId, ts } }, { mergeWithLastSubmission: false });
        return;
      }
      // A new sign-in, or a request to confirm the user again (prompt=login, max_age): the form, always.
      if (details.prompt.name === 'login') {
        res.type('html').send(signInPage(details.uid));
        return;
      }
      // First-party client: consent is granted without asking.
      const accountId = details.session!.accountId;
      const grant = details.grantId
        ? (await provider.Grant.find(details.grantId))!
        : new provider.Grant({ accountId, clientId: String(details.params.client_id) });
      const missing = details.prompt.details as { missingOIDCScope?: string[]; missingOIDCClaims?: string[] };
      if (missing.missingOIDCScope) grant.addOIDCScope(missing.missingOIDCScope.join(' '));
      if (missing.missingOIDCClaims) grant.addOIDCClaims(missing.missingOIDCClaims);
      await provider.interactionFinished(req, res, { consent: { grantId: await grant.save() } }, { mergeWithLastSubmission: true });
    } catch (error) {
      next(error);
    }
  });
  app.post('/interaction/:uid/login', express.urlencoded({ extended: false, limit: '10kb' }), async (req, res, next) => {
    try {
      const details = await provider.interactionDetails(req, res);
      const user = demoUsers.find((u) => u.username === String(req.body?.username ?? '').trim().toLowerCase());
      if (!user || req.body?.password !== password) {
        res.status(401).type('html').send(signInPage(details.uid, 'The user name or password is not right.'));
        return;
      }
      await provider.interactionFinished(req, res, { login: { accountId: user.subject } }, { mergeWithLastSubmission: false });
    } catch (error) {
      next(error);
    }
  });
  app.use(provider.callback());
  httpServer.on('request', app);

  return {
    issuer,
    server: httpServer,
    close: () =>
      new Promise<void>((resolve) => {
        httpServer.closeAllConnections();
        httpServer.close(() => resolve());
      }),
  };
}
