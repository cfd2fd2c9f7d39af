import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BrowserContext } from 'playwright-core';
import type { DataSource } from 'typeorm';
import { launchBrowser, screenshotPath, signInInBrowser, viewports, visible } from '../support/browser';
import { openTestDatabase } from '../support/app';
import { createStudy } from '../support/factories';
import { startStack, usernameOf, type TestStack } from '../support/stack';

let db: DataSource;
let stack: TestStack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
let phone: BrowserContext;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
  browser = await launchBrowser();
  phone = await browser.context.browser()!.newContext({ viewport: viewports.phone });
  const page = await phone.newPage();
  await signInInBrowser(page, stack, usernameOf('staff'));
  await page.close();
});
afterAll(async () => {
  await phone?.close();
  await browser?.close();
  await stack?.close();
  await db?.destroy();
});

// 390 × 844 is a common phone viewport (common practice); a header should leave most of it to the form.
describe('a study on a 390 px phone', () => {
  it('keeps the fixed header at most 120 px tall, and a remove confirmation fully on screen', async () => {
    const study = await createStudy(db);
    const page = await phone.newPage();
    await page.goto(`${stack.url}/studies/${study.id}/vessels`);
    await visible(page, 'add-vessel').click();
    await visible(page, 'add-vessel-OBTUSE_MARGINAL').click();
    await visible(page, 'vessel-0-rest-pa').waitFor();
    const nav = await page.locator('[aria-label="Study sections"]:visible').boundingBox();
    await page.screenshot({ path: screenshotPath('study-header-phone') });
    const bar = await visible(page, 'study-header').boundingBox();
    // Everything above the scrolling form: the study bar and the section tabs.
    expect(nav!.y + nav!.height, `study bar ${bar!.height} px, tabs ${nav!.height} px`).toBeLessThanOrEqual(120);

    await visible(page, 'vessel-0-remove').click();
    for (const id of ['vessel-0-remove-confirm', 'vessel-0-remove-keep']) {
      const box = await visible(page, id).boundingBox();
      expect({ id, right: box!.x + box!.width <= viewports.phone.width, left: box!.x >= 0 }).toEqual({ id, right: true, left: true });
    }
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(viewports.phone.width);
    await page.screenshot({ path: screenshotPath('vessel-remove-phone') });
    await visible(page, 'vessel-0-remove-keep').click();
    await page.close();
  });

  it("scrolls the open section's tab into sight when the study opens on a section far to the right", async () => {
    const study = await createStudy(db);
    const page = await phone.newPage();
    await page.goto(`${stack.url}/studies/${study.id}/attachments`);
    const tab = visible(page, 'section-attachments');
    await tab.waitFor();
    // The row is wider than the phone: without scrolling, this tab starts beyond the right edge.
    const row = await page.locator('[aria-label="Study sections"]:visible').boundingBox();
    await expect.poll(async () => {
      const box = await tab.boundingBox();
      return box!.x >= row!.x && box!.x + box!.width <= row!.x + row!.width;
    }).toBe(true);
    expect(await tab.getAttribute('aria-current')).toBe('page');
    await page.screenshot({ path: screenshotPath('section-tab-in-view-phone') });
    await page.close();
  });

  it('wraps a long clinical-question choice inside its card: nothing moves sideways', async () => {
    const page = await phone.newPage();
    await page.goto(`${stack.url}/studies/new`);
    await visible(page, 'new-question-angina-no-obstruction').click();
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(viewports.phone.width);
    const chip = await visible(page, 'new-question-angina-no-obstruction').boundingBox();
    expect(chip!.x + chip!.width).toBeLessThanOrEqual(viewports.phone.width);
    await page.screenshot({ path: screenshotPath('new-study-phone'), fullPage: true });
    await page.close();
  });
});
