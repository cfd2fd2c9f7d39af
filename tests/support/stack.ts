import type { AddressInfo } from 'node:net';
import { createServer, type Server } from 'node:http';
import type { DataSource } from 'typeorm';
import { createApp } from '../../server/app';
import type { Config } from '../../server/config';
import { startFakeIdp, type FakeIdp, type FakeIdpOptions } from '../../server/fakes/identity-provider';
import { demoUsers } from '../../server/demo/scenario';
import { testConfig } from './app';

export interface TestStack {
  url: string;
  config: Config;
  idp: FakeIdp;
  close(): Promise<void>;
}

/** The real app on a free loopback port, signing in through the real fake identity provider. */
export async function startStack(dataSource: DataSource, overrides: Partial<Config> = {}, idpOptions: Partial<FakeIdpOptions> = {}): Promise<TestStack> {
  const server: Server = createServer();
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const base = testConfig();
  const idp = await startFakeIdp({ port: 0, clientId: base.oidc.clientId, clientSecret: base.oidc.clientSecret, appUrl: url, ...idpOptions });
  const config: Config = {
    ...base,
    publicUrl: url,
    allowedOrigins: [url],
    signInRateLimit: 1000,
    ...overrides,
    oidc: { ...base.oidc, issuer: idp.issuer, ...overrides.oidc },
  };
  server.on('request', createApp({ config, dataSource, log: () => undefined }));
  return {
    url,
    config,
    idp,
    close: async () => {
      server.closeAllConnections();
      await new Promise<void>((resolve) => server.close(() => resolve()));
      await idp.close();
    },
  };
}

/** Cookies per origin, as a browser keeps them (paths and expiry simplified). */
export class CookieJar {
  private jars = new Map<string, Map<string, string>>();
  store(url: string, response: Response): void {
    const origin = new URL(url).origin;
    const jar = this.jars.get(origin) ?? new Map<string, string>();
    this.jars.set(origin, jar);
    for (const line of response.headers.getSetCookie()) {
      const [pair, ...attrs] = line.split(';');
      const eq = pair.indexOf('=');
      const name = pair.slice(0, eq).trim();
      const value = pair.slice(eq + 1).trim();
      const expired = attrs.some((a) => /^\s*max-age=0/i.test(a) || (/^\s*expires=/i.test(a) && Date.parse(a.split('=')[1]) < Date.now()));
      if (expired || value === '') jar.delete(name);
      else jar.set(name, value);
    }
  }
  header(url: string): string {
    const jar = this.jars.get(new URL(url).origin);
    return jar ? [...jar].map(([k, v]) => `${k}=${v}`).join('; ') : '';
  }
  get(url: string, name: string): string | undefined {
    return this.jars.get(new URL(url).origin)?.get(name);
  }
}

export interface SignedIn {
  jar: CookieJar;
  /** The Cookie header to send to the app. */
  cookie: string;
  /** Where the app sent the browser after the callback. */
  landedOn: string;
  /** Every URL the browser visited, in order. */
  hops: string[];
}

/**
 * Walks the authorization code flow as a browser would: app → provider → sign-in form →
 * provider → app callback. Fails the test if the flow does not end back at the app.
 */
export async function signIn(
  stack: TestStack,
  username: string,
  options: { password?: string; returnTo?: string; jar?: CookieJar; reauth?: boolean } = {},
): Promise<SignedIn> {
  const jar = options.jar ?? new CookieJar();
  const hops: string[] = [];
  const query = new URLSearchParams({ ...(options.reauth ? { reauth: '1' } : {}), ...(options.returnTo ? { returnTo: options.returnTo } : {}) }).toString();
  let url = `${stack.url}/api/auth/sign-in${query ? `?${query}` : ''}`;
  let init: RequestInit = {};
  for (let i = 0; i < 20; i++) {
    hops.push(url);
    const response = await fetch(url, { ...init, redirect: 'manual', headers: { ...(init.headers ?? {}), cookie: jar.header(url) } });
    jar.store(url, response);
    init = {};
    // Read the whole answer, as a browser does: the session middleware sends the headers first and
    // holds the last byte until the session is stored, so a step taken on the headers alone could
    // race that write (e.g. a sign-out undone by the callback's late save).
    const body = await response.text();
    const location = response.headers.get('location');
    if (response.status >= 300 && response.status < 400 && location) {
      const next = new URL(location, url).href;
      if (next.startsWith(stack.url) && !next.startsWith(`${stack.url}/api/`)) {
        return { jar, cookie: jar.header(stack.url), landedOn: next.slice(stack.url.length), hops };
      }
      url = next;
      continue;
    }
    const form = body.match(/action="(\/interaction\/[^"]+\/login)"/);
    if (response.status === 200 && form) {
      url = new URL(form[1], url).href;
      init = {
        method: 'POST',
        headers: { 'content-type': 'application/x-www-form-urlencoded' },
        body: new URLSearchParams({ username, password: options.password ?? 'demo' }).toString(),
      };
      continue;
    }
    // A page that posts itself at once (the provider's account switch), as a browser with scripts would.
    const autoPost = body.match(/<form method="post" action="([^"]+)">([\s\S]*?)<\/form>/);
    if (response.status === 200 && autoPost && body.includes('document.forms[0].submit()')) {
      const unescape = (v: string) => v.replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&amp;/g, '&');
      const fields = [...autoPost[2].matchAll(/<input type="hidden" name="([^"]+)" value="([^"]*)"\/?>/g)].map((m) => [m[1], unescape(m[2])]);
      url = new URL(unescape(autoPost[1]), url).href;
      init = { method: 'POST', headers: { 'content-type': 'application/x-www-form-urlencoded' }, body: new URLSearchParams(fields).toString() };
      continue;
    }
    const text = body.replace(/<style[\s\S]*?<\/style>/g, '').replace(/<[^>]+>/g, ' ').replace(/\s+/g, ' ');
    throw new Error(`sign-in flow stopped at ${url} with ${response.status}: ${text.slice(0, 300)}`);
  }
  throw new Error('sign-in flow did not finish within 20 hops');
}

export const usernameOf = (role: string | null) => demoUsers.find((u) => u.role === role)!.username;
