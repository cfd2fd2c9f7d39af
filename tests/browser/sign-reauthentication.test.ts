import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { launchBrowser, screenshotPath, signInInBrowser, viewports, visible } from '../support/browser';
import { openTestDatabase } from '../support/app';
import { completeStudy } from '../support/reports';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

// An electronic signature asks who signs again when the sign-in is old: the identity provider's
// prompt=login (OpenID Connect Core 1.0 §3.1.2.1), then back to the report to sign.
let db: DataSource;
let stack: TestStack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await stack?.close();
  await db?.destroy();
});

describe('signing with an old sign-in', () => {
  it('links to the provider, which asks for the password again, and comes back to the report to sign', async () => {
    const staff = (await signIn(stack, usernameOf('staff'))).cookie;
    const study = await completeStudy(stack.url, staff);
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('physician'));
      const physicianId = (await db.query(`SELECT id FROM app_user WHERE issuer = $1 AND subject = 'demo-physician'`, [stack.idp.issuer]))[0].id;
      const [, aged] = await db.query(
        `UPDATE http_session SET sess = jsonb_set(sess::jsonb, '{auth,authenticatedAt}', to_jsonb($2::bigint))::json WHERE sess::jsonb #>> '{auth,userId}' = $1`,
        [physicianId, Date.now() - (stack.config.signReauthMinutes + 1) * 60_000],
      );
      expect(aged).toBeGreaterThanOrEqual(1);

      const reportUrl = `${stack.url}/studies/${study.id}/report`;
      await page.goto(reportUrl);
      await visible(page, 'report-complete').waitFor();
      await visible(page, 'report-action-sign').click();
      const error = visible(page, 'report-action-error');
      await error.waitFor();
      await expect(error.innerText()).resolves.toContain('Signing needs a sign-in from the last');
      await page.screenshot({ path: screenshotPath('report-reauthenticate-phone') });

      await error.getByText('Sign in again').click();
      await page.waitForURL((url) => url.href.startsWith(stack.idp.issuer));
      // The provider had a session, yet asks again.
      await page.getByTestId('idp-username').fill(usernameOf('physician'));
      await page.getByTestId('idp-password').fill('demo');
      await page.getByTestId('idp-submit').click();
      await page.waitForURL(reportUrl);
      await visible(page, 'report-complete').waitFor();
      await visible(page, 'report-action-sign').click();
      await visible(page, 'report-version-1').waitFor({ timeout: 20_000 });
      const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM report_version WHERE study_id = $1`, [study.id]);
      expect(n).toBe(1);
    } finally {
      await context.close();
    }
  }, 90_000);
});
