import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { openTestDatabase } from '../support/app';
import { completeStudy } from '../support/reports';
import { signIn, startStack, usernameOf, type SignedIn, type TestStack } from '../support/stack';

// An electronic signature confirms who signs: a sign-in older than SIGN_REAUTH_MINUTES is renewed at
// the identity provider with prompt=login and max_age=0 (OpenID Connect Core 1.0 §3.1.2.1), and the
// ID token's auth_time (§2) must show a sign-in made after that request.

let db: DataSource;
let stack: TestStack;
let stale: TestStack;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
  // A provider that ignores prompt=login / max_age and answers from its session signed in an hour ago.
  stale = await startStack(db, {}, { staleReauthSeconds: 3600 });
});
afterAll(async () => {
  await stack.close();
  await stale.close();
  await db.destroy();
});

const sidOf = (session: SignedIn) => decodeURIComponent(session.jar.get(session.hops[0], 'isobar.sid')!).slice(2).split('.')[0];
const sessionAuth = async (session: SignedIn) =>
  (await db.query(`SELECT sess::jsonb -> 'auth' AS auth FROM http_session WHERE sid = $1`, [sidOf(session)]))[0]?.auth as
    | { signedInAt: number; authenticatedAt: number; subject: string }
    | undefined;
/** Moves the session's last confirmation of who the user is into the past. */
async function ageConfirmation(session: SignedIn, minutes: number): Promise<void> {
  const [, count] = await db.query(
    `UPDATE http_session SET sess = jsonb_set(sess::jsonb, '{auth,authenticatedAt}', to_jsonb($2::bigint))::json WHERE sid = $1`,
    [sidOf(session), Date.now() - minutes * 60_000],
  );
  expect(count).toBe(1);
}
const sign = (s: TestStack, cookie: string, studyId: string, version: number) =>
  request(s.url).post(`/api/studies/${studyId}/sign`).set('Cookie', cookie).set('Origin', s.url).send({ version });
const lastFailure = async () => (await db.query(`SELECT detail FROM audit_event WHERE action = 'sign-in-failed' ORDER BY id DESC LIMIT 1`))[0];

describe('confirming who signs at the identity provider', () => {
  it('refuses a sign with an old confirmation, renews it with prompt=login and max_age=0, returns to the report, then signs', async () => {
    const staff = (await signIn(stack, usernameOf('staff'))).cookie;
    const physician = await signIn(stack, usernameOf('physician'));
    const study = await completeStudy(stack.url, staff);
    const before = await sessionAuth(physician);
    expect(before?.authenticatedAt).toBeGreaterThan(Date.now() - 60_000);

    // A plain sign-in again rides on the provider's session: no sign-in form.
    const sso = await signIn(stack, usernameOf('physician'), { jar: physician.jar, returnTo: '/worklist' });
    expect(sso.hops.some((h) => h.endsWith('/login'))).toBe(false);
    physician.cookie = sso.cookie;
    physician.hops = sso.hops;

    await ageConfirmation(physician, stack.config.signReauthMinutes + 1);
    const refused = await sign(stack, physician.cookie, study.id, study.version).expect(401);
    expect(refused.body.type).toMatch(/\/reauthentication-required$/);
    const reportPath = `/studies/${study.id}/report`;
    expect(refused.body.reauthenticateUrl).toBe(`/api/auth/sign-in?reauth=1&returnTo=${encodeURIComponent(reportPath)}`);
    const signedInAt = (await sessionAuth(physician))!.signedInAt;

    const requestedAt = Date.now();
    const renewed = await signIn(stack, usernameOf('physician'), { jar: physician.jar, reauth: true, returnTo: reportPath });
    const authorize = new URL(renewed.hops.find((h) => h.startsWith(`${stack.idp.issuer}/auth?`))!);
    expect(authorize.searchParams.get('prompt')).toBe('login');
    expect(authorize.searchParams.get('max_age')).toBe('0');
    // The provider asked for the password again although it had a session.
    expect(renewed.hops.some((h) => h.endsWith('/login'))).toBe(true);
    expect(renewed.landedOn).toBe(reportPath);

    const after = (await sessionAuth(renewed))!;
    // auth_time is whole seconds: the confirmation is no older than the second the request was made in.
    expect(after.authenticatedAt).toBeGreaterThanOrEqual(Math.floor(requestedAt / 1000) * 1000);
    expect(after.signedInAt).toBe(signedInAt); // the session's absolute limit still counts from its start
    const recorded = (await db.query(`SELECT detail FROM audit_event WHERE action = 'sign-in' ORDER BY id DESC LIMIT 1`))[0];
    expect(recorded.detail).toMatchObject({ reauthentication: true });

    const signed = await sign(stack, renewed.cookie, study.id, study.version).expect(201);
    expect(signed.body).toMatchObject({ versionNo: 1, status: 'final' });
  });

  it('refuses a renewal whose auth_time is older than the request, and signing stays refused', async () => {
    const staff = (await signIn(stale, usernameOf('staff'))).cookie;
    const physician = await signIn(stale, usernameOf('physician'));
    const study = await completeStudy(stale.url, staff);
    await ageConfirmation(physician, stale.config.signReauthMinutes + 1);
    const aged = (await sessionAuth(physician))!;
    await sign(stale, physician.cookie, study.id, study.version).expect(401);

    const reportPath = `/studies/${study.id}/report`;
    const renewed = await signIn(stale, usernameOf('physician'), { jar: physician.jar, reauth: true, returnTo: reportPath });
    expect(renewed.hops.some((h) => h.endsWith('/login'))).toBe(false); // the provider did not ask again
    expect(renewed.landedOn).toBe(reportPath);
    expect(await lastFailure()).toMatchObject({ detail: { reason: 'reauthentication-not-fresh' } });
    // Still signed in, still not confirmed.
    expect((await sessionAuth(physician))!.authenticatedAt).toBe(aged.authenticatedAt);
    const again = await sign(stale, physician.cookie, study.id, study.version).expect(401);
    expect(again.body.type).toMatch(/\/reauthentication-required$/);
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM report_version WHERE study_id = $1`, [study.id]);
    expect(n).toBe(0);
  });

  it('refuses a renewal made by another person, keeping the first session as it was', async () => {
    const physician = await signIn(stack, usernameOf('physician'));
    await ageConfirmation(physician, stack.config.signReauthMinutes + 1);
    const aged = (await sessionAuth(physician))!;
    // Someone else types their own name at the provider's form.
    const other = await signIn(stack, usernameOf('chief'), { jar: physician.jar, reauth: true, returnTo: '/worklist' });
    expect(other.landedOn).toBe('/worklist');
    expect(await lastFailure()).toMatchObject({ detail: { reason: 'reauthentication-other-user' } });
    expect(await sessionAuth(physician)).toMatchObject({ subject: aged.subject, authenticatedAt: aged.authenticatedAt });
  });
});
