import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { launchBrowser, screenshotPath, viewports } from '../support/browser';
import { openTestDatabase, startTestServer } from '../support/app';

let db: DataSource;
let server: Awaited<ReturnType<typeof startTestServer>>;
let browser: Awaited<ReturnType<typeof launchBrowser>>;

beforeAll(async () => {
  db = await openTestDatabase();
  server = await startTestServer(db);
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.close();
  await db?.destroy();
});

describe.each(Object.entries(viewports))('signed-out start page at %s width', (name, viewport) => {
  it('shows the product, a sign-in button, the live service state and the caution', async () => {
    const page = await browser.context.newPage();
    await page.setViewportSize(viewport);
    // Signed out, the app's root sends the browser to the sign-in page.
    await page.goto(server.url + '/');
    await page.waitForURL(/\/sign-in$/);
    await page.getByRole('heading', { level: 1, name: 'Isobar' }).waitFor({ state: 'visible' });
    const signIn = page.getByRole('button', { name: 'Sign in with your hospital account' });
    await signIn.waitFor();
    const box = await signIn.boundingBox();
    expect(box!.height).toBeGreaterThanOrEqual(44);
    await page.getByTestId('service-status-up').waitFor();
    await expect(page.getByTestId('caution-note').innerText()).resolves.toMatch(/Decision support only/);
    // Bundled fonts, not a system fallback.
    const family = await page.getByRole('heading', { level: 1 }).evaluate((el) => getComputedStyle(el).fontFamily);
    expect(family).toContain('PublicSans_700Bold');
    expect(await page.evaluate(() => document.fonts.check('16px PublicSans_400Regular'))).toBe(true);
    // It promises only what the product does today: no report signing or delivery yet.
    const text = await page.getByTestId('sign-in-page').innerText();
    expect(text).not.toMatch(/sign(ed)? report|report and sign|deliver/i);
    // Nothing wider than the viewport.
    expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(viewport.width);
    await page.screenshot({ path: screenshotPath(`sign-in-page-${name}`), fullPage: true });
    await page.close();
  });
});

describe('keyboard use', () => {
  it('reaches the sign-in button with Tab and shows a visible focus ring on it', async () => {
    const page = await browser.context.newPage();
    await page.goto(server.url + '/sign-in');
    await page.getByTestId('sign-in-button').waitFor();
    for (let i = 0; i < 10; i++) {
      await page.keyboard.press('Tab');
      if (await page.getByTestId('sign-in-button').evaluate((el) => el === document.activeElement)) break;
    }
    const ring = await page.getByTestId('sign-in-button').evaluate((el) => {
      const s = getComputedStyle(el);
      return { focused: el === document.activeElement, style: s.outlineStyle, width: s.outlineWidth };
    });
    expect(ring).toEqual({ focused: true, style: 'solid', width: '3px' });
    await page.close();
  });
});

describe('not-found route', () => {
  it('shows a clear page with a way back', async () => {
    const page = await browser.context.newPage();
    await page.goto(server.url + '/no/such/page');
    await page.getByTestId('not-found-page').waitFor();
    await expect(page.getByRole('heading', { level: 1 }).innerText()).resolves.toBe('This page does not exist');
    await page.getByTestId('not-found-home-link').click();
    await page.getByTestId('sign-in-page').waitFor();
    await page.close();
  });
});
