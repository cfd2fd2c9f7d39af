import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { defaultThresholds } from '../../shared/physiology/thresholds';
import { thresholdsInForce } from '../../server/settings/queries/thresholds';
import { launchBrowser, screenshotPath, signInInBrowser, viewports, visible } from '../support/browser';
import { openTestDatabase } from '../support/app';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

let db: DataSource;
let stack: TestStack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
  browser = await launchBrowser();
});
afterAll(async () => {
  // Back to the published values for the files after this one.
  if (stack) {
    const admin = (await signIn(stack, usernameOf('admin'))).cookie;
    const inForce = await thresholdsInForce(db);
    const back = Object.fromEntries(Object.entries(defaultThresholds).filter(([k, v]) => inForce.values[k as keyof typeof defaultThresholds] !== v));
    if (Object.keys(back).length) await request(stack.url).post('/api/admin/thresholds').set('Cookie', admin).set('Origin', stack.url).send({ values: back }).expect(201);
  }
  await browser?.close();
  await stack?.close();
  await db?.destroy();
});

describe("the admin's page", () => {
  it('on a desktop: changes the CFR cut-off (EAPCI 2020 2.0 → ESC 2024 range 2.0–2.5), refused outside the range, recorded with before and after', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.desktop });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('admin'));
      await page.waitForURL(/\/admin$/);
      await visible(page, 'threshold-row-cfr').waitFor();
      await visible(page, 'role-mapping').waitFor();
      await visible(page, 'template-v2').waitFor();
      await expect(visible(page, 'threshold-source-cfr').innerText()).resolves.toMatch(/EAPCI 2020/);
      await page.screenshot({ path: screenshotPath('admin-desktop'), fullPage: true });

      // Out of range: the field says why, nothing is saved.
      await visible(page, 'threshold-cfr').fill('2.7');
      await visible(page, 'threshold-save').click();
      await expect(visible(page, 'threshold-cfr-error').innerText()).resolves.toMatch(/CFR cut-off must be between 2\.00 and 2\.50/);
      await expect(visible(page, 'threshold-save-error').innerText()).resolves.toMatch(/CFR cut-off/);
      await visible(page, 'threshold-row-cfr').scrollIntoViewIfNeeded();
      await page.screenshot({ path: screenshotPath('admin-threshold-error-desktop') });

      await visible(page, 'threshold-cfr').fill('2.4');
      await visible(page, 'threshold-note').fill('Lab follows the upper published range');
      await visible(page, 'threshold-save').click();
      await expect(visible(page, 'threshold-saved').innerText()).resolves.toMatch(/1 change, in force from/);
      await expect(visible(page, 'threshold-source-cfr').innerText()).resolves.toMatch(/^Lab setting \(published default 2\.00/);
      await visible(page, 'threshold-row-cfr').scrollIntoViewIfNeeded();
      await page.screenshot({ path: screenshotPath('admin-threshold-saved-desktop') });
      expect((await thresholdsInForce(db)).values.cfr).toBe(2.4);
      const [audit] = await db.query(`SELECT actor_role, detail FROM audit_event WHERE entity_type = 'settings' AND entity_id = 'thresholds' AND action <> 'read' ORDER BY id DESC LIMIT 1`);
      expect(audit.actor_role).toBe('admin');
      expect(audit.detail.changed).toEqual({ cfr: { before: 2, after: 2.4 } });

      // A template version's files can be read.
      await visible(page, 'template-view-v2').click();
      await visible(page, 'template-sources-v2').waitFor();
      await visible(page, 'admin-templates').scrollIntoViewIfNeeded();
      await page.screenshot({ path: screenshotPath('admin-templates-desktop') });
    } finally {
      await context.close();
    }
  }, 180_000);

  it('on a phone: every section fits 390 px, and a bad time zone is named', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone, isMobile: true, hasTouch: true });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('admin'));
      await page.waitForURL(/\/admin$/);
      await visible(page, 'threshold-row-cfr').waitFor();
      await visible(page, 'setting-time-zone').waitFor();
      const overflow = await page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
      expect(overflow).toBeLessThanOrEqual(0);
      await page.screenshot({ path: screenshotPath('admin-phone-top') });
      await visible(page, 'threshold-row-cfr').scrollIntoViewIfNeeded();
      await page.screenshot({ path: screenshotPath('admin-phone-thresholds') });
      await visible(page, 'setting-time-zone').fill('Mars/Olympus');
      await visible(page, 'lab-settings-save').click();
      await expect(visible(page, 'setting-time-zone-error').innerText()).resolves.toMatch(/IANA time zone/);
      await visible(page, 'setting-time-zone').scrollIntoViewIfNeeded();
      await page.screenshot({ path: screenshotPath('admin-phone-settings-error') });
    } finally {
      await context.close();
    }
  }, 180_000);
});
