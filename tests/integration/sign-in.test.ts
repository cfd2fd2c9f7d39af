import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { homeOf, permissionsOf, type Role } from '../../shared/auth/permissions';
import { openTestDatabase } from '../support/app';
import { signIn, startStack, usernameOf, CookieJar, type TestStack } from '../support/stack';
import { createSessionStore } from '../../server/auth/session';

let db: DataSource;
let stack: TestStack;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
});
afterAll(async () => {
  await stack.close();
  await db.destroy();
});

const lastAudit = async (action: string) =>
  (await db.query(`SELECT * FROM audit_event WHERE action = $1 ORDER BY id DESC LIMIT 1`, [action]))[0];

describe('sign-in through the identity provider (authorization code + PKCE)', () => {
  it.each(['staff', 'physician', 'coder', 'chief', 'admin'] as Role[])('signs in the %s demo user and lands on their page', async (role) => {
    const session = await signIn(stack, usernameOf(role));
    expect(session.landedOn).toBe(homeOf[role]);
    const me = await request(stack.url).get('/api/me').set('Cookie', session.cookie).expect(200);
    expect(me.body).toMatchObject({ role, home: homeOf[role], permissions: permissionsOf(role) });
    // The authorization request carried a PKCE challenge (S256), a state and a nonce.
    const authorize = new URL(session.hops.find((h) => h.startsWith(stack.idp.issuer + '/auth?'))!);
    expect(authorize.searchParams.get('code_challenge_method')).toBe('S256');
    expect(authorize.searchParams.get('code_challenge')).toMatch(/^[\w-]{43}$/);
    expect(authorize.searchParams.get('state')).toBeTruthy();
    expect(authorize.searchParams.get('nonce')).toBeTruthy();
  });

  it('gives a user whose groups map to no role a session with no role and no permissions', async () => {
    const session = await signIn(stack, usernameOf(null));
    expect(session.landedOn).toBe('/');
    const me = await request(stack.url).get('/api/me').set('Cookie', session.cookie).expect(200);
    expect(me.body).toMatchObject({ role: null, permissions: [], home: null });
    await request(stack.url).get('/api/studies').set('Cookie', session.cookie).expect(403);
  });

  it('provisions the user from the claims and records the sign-in', async () => {
    await signIn(stack, usernameOf('coder'));
    const [user] = await db.query(`SELECT * FROM app_user WHERE issuer = $1 AND subject = 'demo-coder'`, [stack.idp.issuer]);
    expect(user).toMatchObject({ role: 'coder', email: 'mara.linde@saltmarsh.example', display_name: 'Mara Linde, CCS' });
    expect(user.last_sign_in_at).toBeInstanceOf(Date);
    expect(await lastAudit('sign-in')).toMatchObject({ actor_user_id: user.id, actor_role: 'coder', outcome: 'success', entity_id: user.id });
  });

  it('issues a new session id at sign-in (no session fixation)', async () => {
    const jar = new CookieJar();
    const start = await fetch(`${stack.url}/api/auth/sign-in`, { redirect: 'manual' });
    jar.store(stack.url, start);
    const before = jar.get(stack.url, 'isobar.sid');
    expect(before).toBeTruthy();
    const session = await signIn(stack, usernameOf('staff'), { jar });
    expect(jar.get(stack.url, 'isobar.sid')).not.toBe(before);
    // The pre-sign-in id is worth nothing afterwards.
    await request(stack.url).get('/api/me').set('Cookie', `isobar.sid=${before}`).expect(401);
    await request(stack.url).get('/api/me').set('Cookie', session.cookie).expect(200);
  });

  it('sets the session cookie HttpOnly and SameSite=Lax, with an idle expiry', async () => {
    const res = await fetch(`${stack.url}/api/auth/sign-in`, { redirect: 'manual' });
    const cookie = res.headers.getSetCookie().find((c) => c.startsWith('isobar.sid='))!;
    expect(cookie).toMatch(/HttpOnly/i);
    expect(cookie).toMatch(/SameSite=Lax/i);
    expect(cookie).toMatch(/Expires=/i);
    expect(cookie).not.toMatch(/Secure/i); // plain http on loopback; Secure whenever PUBLIC_URL is https
  });

  it('returns to a requested page after sign-in, but never to another site', async () => {
    expect((await signIn(stack, usernameOf('physician'), { returnTo: '/studies/abc' })).landedOn).toBe('/studies/abc');
    expect((await signIn(stack, usernameOf('physician'), { returnTo: '//evil.example/x' })).landedOn).toBe('/');
    expect((await signIn(stack, usernameOf('physician'), { returnTo: 'https://evil.example' })).landedOn).toBe('/');
  });

  it('refuses a wrong password at the provider with its own message', async () => {
    await expect(signIn(stack, usernameOf('staff'), { password: 'wrong' })).rejects.toThrow(/with 401: .*The user name or password is not right/s);
  });

  it('records a failed sign-in when the callback does not match a pending request', async () => {
    const res = await request(stack.url).get('/api/auth/callback?code=forged&state=forged').expect(303);
    expect(res.headers.location).toBe('/sign-in?error=expired');
    expect(await lastAudit('sign-in-failed')).toMatchObject({ outcome: 'failure', detail: { reason: 'no-pending-sign-in' } });
  });

  it('records a failed sign-in when the state does not match', async () => {
    const jar = new CookieJar();
    const start = await fetch(`${stack.url}/api/auth/sign-in`, { redirect: 'manual' });
    jar.store(stack.url, start);
    const res = await request(stack.url).get('/api/auth/callback?code=x&state=not-the-state').set('Cookie', jar.header(stack.url)).expect(303);
    expect(res.headers.location).toBe('/sign-in?error=failed');
    expect(await lastAudit('sign-in-failed')).toMatchObject({ detail: { reason: 'token-exchange-failed' } });
  });
});

describe('sign-out', () => {
  it('ends the session at Isobar, records it, and points the browser at the provider to end it there', async () => {
    const session = await signIn(stack, usernameOf('physician'));
    const res = await request(stack.url).post('/api/auth/sign-out').set('Cookie', session.cookie).set('Origin', stack.url).expect(200);
    const redirect = new URL(res.body.redirect);
    expect(redirect.origin + redirect.pathname).toBe(`${stack.idp.issuer}/session/end`);
    expect(redirect.searchParams.get('post_logout_redirect_uri')).toBe(`${stack.url}/sign-in?signedOut=1`);
    expect(redirect.searchParams.get('id_token_hint')).toBeTruthy();
    await request(stack.url).get('/api/me').set('Cookie', session.cookie).expect(401);
    expect(await lastAudit('sign-out')).toMatchObject({ actor_role: 'physician', outcome: 'success' });
    const [{ count }] = await db.query(`SELECT count(*)::int AS count FROM http_session WHERE sess::text LIKE '%' || $1 || '%'`, [res.body.redirect.split('id_token_hint=')[1].split('&')[0]]);
    expect(count).toBe(0);
  });
});

describe('cross-site request forgery', () => {
  it('refuses a state-changing request from another origin, or with no origin at all', async () => {
    const session = await signIn(stack, usernameOf('staff'));
    const forged = await request(stack.url).post('/api/auth/sign-out').set('Cookie', session.cookie).set('Origin', 'https://evil.example').expect(403);
    expect(forged.body).toMatchObject({ title: 'Cross-site request refused' });
    await request(stack.url).post('/api/auth/sign-out').set('Cookie', session.cookie).expect(403);
    await request(stack.url).post('/api/auth/sign-out').set('Cookie', session.cookie).set('Referer', 'https://evil.example/page').expect(403);
    // Still signed in: nothing happened.
    await request(stack.url).get('/api/me').set('Cookie', session.cookie).expect(200);
    await request(stack.url).post('/api/auth/sign-out').set('Cookie', session.cookie).set('Referer', `${stack.url}/`).expect(200);
  });
});

describe('session time limits', () => {
  it('ends a session past its absolute limit however active it has been', async () => {
    const session = await signIn(stack, usernameOf('chief'));
    await request(stack.url).get('/api/me').set('Cookie', session.cookie).expect(200);
    const past = Date.now() - (stack.config.session.maxHours + 1) * 3_600_000;
    await db.query(
      `UPDATE http_session SET sess = jsonb_set(sess::jsonb, '{auth,signedInAt}', to_jsonb($1::bigint))::json WHERE sess::jsonb #>> '{auth,role}' = 'chief'`,
      [past],
    );
    const res = await request(stack.url).get('/api/me').set('Cookie', session.cookie).expect(401);
    expect(res.body.detail).toBe('Your session has ended. Sign in again.');
  });

  it('lets a sign-in start on the very request that finds the session expired', async () => {
    const session = await signIn(stack, usernameOf('coder'));
    const past = Date.now() - (stack.config.session.maxHours + 1) * 3_600_000;
    await db.query(
      `UPDATE http_session SET sess = jsonb_set(sess::jsonb, '{auth,signedInAt}', to_jsonb($1::bigint))::json WHERE sess::jsonb #>> '{auth,role}' = 'coder'`,
      [past],
    );
    const res = await request(stack.url).get('/api/auth/sign-in').set('Cookie', session.cookie).expect(303);
    expect(res.headers.location).toContain(`${stack.idp.issuer}/auth?`);
  });

  it('keeps idle sessions for the configured minutes only (store expiry follows the cookie)', async () => {
    const session = await signIn(stack, usernameOf('admin'));
    const sid = decodeURIComponent(session.jar.get(stack.url, 'isobar.sid')!).slice(2).split('.')[0];
    const [{ expire }] = await db.query(`SELECT expire FROM http_session WHERE sid = $1`, [sid]);
    const minutes = (new Date(expire).getTime() - Date.now()) / 60_000;
    expect(minutes).toBeGreaterThan(stack.config.session.idleMinutes - 1);
    expect(minutes).toBeLessThanOrEqual(stack.config.session.idleMinutes + 0.1);
  });
});

describe('rate limiting', () => {
  it('answers 429 after too many sign-in attempts from one address', async () => {
    const limited = await startStack(db, { signInRateLimit: 3 });
    try {
      for (let i = 0; i < 3; i++) await request(limited.url).get('/api/auth/sign-in').expect(303);
      const res = await request(limited.url).get('/api/auth/sign-in').expect(429);
      expect(res.headers['content-type']).toMatch(/problem\+json/);
      expect(res.body.title).toBe('Too many sign-in attempts');
    } finally {
      await limited.close();
    }
  });
});

describe('an ended session stays ended', () => {
  it('is not brought back by a save that lands after the sign-out', async () => {
    const session = await signIn(stack, usernameOf('staff'));
    const sid = decodeURIComponent(session.jar.get(stack.url, 'isobar.sid')!).slice(2).split('.')[0];
    const [{ sess }] = await db.query(`SELECT sess FROM http_session WHERE sid = $1`, [sid]);
    await request(stack.url).post('/api/auth/sign-out').set('Cookie', session.cookie).set('Origin', stack.url).expect(200);
    // A late end-of-request save of the sign-in callback, through the store the app uses.
    const store = createSessionStore(stack.config, db);
    await new Promise<void>((resolve, reject) => store.set(sid, sess, (err) => (err ? reject(err) : resolve())));
    await request(stack.url).get('/api/me').set('Cookie', session.cookie).expect(401);
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM http_session_ended WHERE sid = $1`, [sid]);
    expect(n).toBe(1);
  });

  it('also retires the pre-sign-in id when the session is rotated at sign-in', async () => {
    const jar = new CookieJar();
    const start = await fetch(`${stack.url}/api/auth/sign-in`, { redirect: 'manual' });
    await start.text();
    jar.store(stack.url, start);
    const before = decodeURIComponent(jar.get(stack.url, 'isobar.sid')!).slice(2).split('.')[0];
    await signIn(stack, usernameOf('staff'), { jar });
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM http_session_ended WHERE sid = $1`, [before]);
    expect(n).toBe(1);
  });
});
