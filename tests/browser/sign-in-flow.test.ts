import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import type { DataSource } from 'typeorm';
import { homeOf, roleLabel, type Role } from '../../shared/auth/permissions';
import { demoUsers } from '../../server/demo/scenario';
import { launchBrowser, screenshotPath, signInInBrowser, viewports } from '../support/browser';
import { openTestDatabase } from '../support/app';
import { createStudy } from '../support/factories';
import { startStack, usernameOf, type TestStack } from '../support/stack';

let db: DataSource;
let stack: TestStack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
let study: Awaited<ReturnType<typeof createStudy>>;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
  browser = await launchBrowser();
  study = await createStudy(db, { state: 'awaiting-signature', endedHoursAgo: 30 });
});
afterAll(async () => {
  await browser?.close();
  await stack?.close();
  await db?.destroy();
});


const pageOf: Record<Role, string> = { staff: 'Worklist', physician: 'Worklist', coder: 'Coding queue', chief: 'Turnaround', admin: 'Administration' };

describe('signing in from the browser', () => {
  it.each(Object.keys(pageOf) as Role[])('lands the %s user on their own page', async (role) => {
    const context = await browser.context.browser()!.newContext();
    const page = await context.newPage();
    await page.setViewportSize(viewports.phone);
    try {
      await signInInBrowser(page, stack, usernameOf(role));
      expect(new URL(page.url()).pathname).toBe(homeOf[role]);
      await page.getByRole('heading', { level: 1, name: pageOf[role] }).waitFor();
      await expect(page.getByTestId('signed-in-role').last().innerText()).resolves.toBe(roleLabel[role]);
      await page.screenshot({ path: screenshotPath(`home-${role}-phone`) });
    } finally {
      await context.close();
    }
  });

  it('shows the no-access page to a user with no role', async () => {
    const context = await browser.context.browser()!.newContext();
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf(null));
      await page.getByTestId('no-access-page').waitFor();
      await expect(page.getByRole('heading', { level: 1 }).innerText()).resolves.toBe('No access to Isobar yet');
      await expect(page.getByTestId('no-access-page').innerText()).resolves.toContain(demoUsers.find((u) => u.role === null)!.displayName);
      await page.screenshot({ path: screenshotPath('no-access-phone') });
    } finally {
      await context.close();
    }
  });

  it('signs out, and the back button shows no patient data afterwards', async () => {
    const context = await browser.context.browser()!.newContext();
    const page = await context.newPage();
    await page.setViewportSize(viewports.desktop);
    try {
      await signInInBrowser(page, stack, usernameOf('staff'));
      const row = page.getByTestId(`study-row-${study.accession}`);
      await row.waitFor();
      await expect(row.innerText()).resolves.toContain(study.patient.mrn);
      await page.screenshot({ path: screenshotPath('worklist-staff-desktop') });
      await page.getByTestId('sign-out-button').click();
      await page.waitForURL((url) => url.href.startsWith(stack.url) && url.pathname === '/sign-in');
      await page.getByTestId('signed-out-notice').waitFor();
      await page.goBack();
      await page.waitForLoadState('load');
      await page.goBack().catch(() => undefined);
      await page.waitForLoadState('load');
      await page.waitForTimeout(500);
      const text = await page.evaluate(() => document.body.innerText);
      expect(text).not.toContain(study.patient.mrn);
      // And the session is gone at the server as well.
      const me = await page.evaluate(async () => (await fetch('/api/me')).status).catch(() => 401);
      expect(me).toBe(401);
    } finally {
      await context.close();
    }
  });

  it('signs out every open tab when one tab signs out', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.desktop });
    try {
      const a = await context.newPage();
      await signInInBrowser(a, stack, usernameOf('staff'));
      const b = await context.newPage();
      await b.goto(stack.url + '/');
      await b.getByTestId(`study-row-${study.accession}`).waitFor();
      await a.getByTestId('sign-out-button').click();
      await b.waitForURL((url) => url.pathname === '/sign-in', { timeout: 10_000 });
      await b.getByTestId('signed-out-notice').waitFor();
      expect(await b.evaluate(() => document.body.innerText)).not.toContain(study.patient.mrn);
    } finally {
      await context.close();
    }
  });
});

describe('getting around', () => {
  it('returns to the study link after signing in from it', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    try {
      await page.goto(`${stack.url}/studies/${study.id}`);
      await page.waitForURL(/\/sign-in/);
      await page.getByRole('button', { name: 'Sign in with your hospital account' }).click();
      await page.waitForURL((url) => url.href.startsWith(stack.idp.issuer));
      await page.getByTestId('idp-username').fill(usernameOf('physician'));
      await page.getByTestId('idp-password').fill('demo');
      await page.getByTestId('idp-submit').click();
      await page.waitForURL((url) => url.href.startsWith(stack.url) && url.pathname === `/studies/${study.id}`);
      await page.getByTestId('study-editor').waitFor();
    } finally {
      await context.close();
    }
  });

  it('says at once that a study is missing, without retrying', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('staff'));
      const started = Date.now();
      await page.goto(`${stack.url}/studies/00000000-0000-4000-8000-000000000000`);
      await page.getByText('No such study').waitFor();
      expect(Date.now() - started).toBeLessThan(4000);
    } finally {
      await context.close();
    }
  });

  it('says at once that a study is not for this role', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('admin'));
      let studyReads = 0;
      page.on('request', (r) => {
        if (r.url().endsWith(`/api/studies/${study.id}`)) studyReads++;
      });
      const started = Date.now();
      await page.goto(`${stack.url}/studies/${study.id}`);
      await page.getByText('Your role may not open this study').waitFor();
      expect(Date.now() - started).toBeLessThan(4000);
      await page.waitForTimeout(1500);
      expect(studyReads).toBe(1);
      await page.screenshot({ path: screenshotPath('study-forbidden-phone') });
    } finally {
      await context.close();
    }
  });

  // Coding queue rows open the study's code review: tests/browser/coding-review.test.ts.
  it('opens a study from the turnaround list, and the chief sees more tabs are there', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('chief'));
      // Four tabs do not fit 390 px: a cue says the row scrolls.
      await page.getByTestId('tabs-more-cue').waitFor();
      await page.screenshot({ path: screenshotPath('turnaround-chief-phone') });
      await page.getByTestId(`study-row-${study.accession}`).click();
      await page.waitForURL((url) => url.pathname === `/studies/${study.id}`);
    } finally {
      await context.close();
    }
  });

  it('keeps worklist filters in the address, and they are radio groups with Space and arrow keys', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.desktop });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('staff'));
      const draft = page.getByTestId('filter-state-draft');
      await draft.waitFor();
      expect(await draft.getAttribute('role')).toBe('radio');
      await draft.focus();
      await page.keyboard.press('Space');
      await page.waitForURL(/state=draft/);
      await page.keyboard.press('ArrowRight');
      await page.waitForURL(/state=awaiting-signature/);
      await page.getByTestId('worklist-search').fill(study.patient.mrn.toLowerCase());
      await page.waitForURL(/q=/);
      await page.reload();
      await expect.poll(() => page.getByTestId('filter-state-awaiting-signature').getAttribute('aria-checked')).toBe('true');
      expect(await page.getByTestId('worklist-search').inputValue()).toBe(study.patient.mrn.toLowerCase());
      await page.getByTestId(`study-row-${study.accession}`).waitFor();
    } finally {
      await context.close();
    }
  });
});
