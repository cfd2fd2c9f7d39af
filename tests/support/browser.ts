import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { chromium, type BrowserContext, type Page } from 'playwright-core';

/** Debian's chromium, headless, with every background connection switched off (no network here). */
export async function launchBrowser(): Promise<{ context: BrowserContext; close: () => Promise<void> }> {
  const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'isobar-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: process.env.CHROMIUM_PATH ?? '/usr/bin/chromium',
    args: [
      '--headless',
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
    ],
  });
  return {
    context,
    close: async () => {
      await context.close();
      fs.rmSync(profile, { recursive: true, force: true });
    },
  };
}

export const viewports = {
  phone: { width: 390, height: 844 },
  desktop: { width: 1440, height: 900 },
} as const;

/** Screenshots for review land in test-results/ (ignored by git). */
export function screenshotPath(name: string): string {
  const dir = path.resolve('test-results', 'screenshots');
  fs.mkdirSync(dir, { recursive: true });
  return path.join(dir, `${name}.png`);
}

/** The element with this test id that is on screen (Expo Router keeps earlier screens mounted, hidden). */
export const visible = (page: Page, testID: string) => page.locator(`[data-testid="${testID}"]:visible`);

/**
 * Signs in as a person would: the app's sign-in page, the identity provider's form, back to the app.
 * Resolves once the browser is on an app page again (the page for the user's role).
 */
export async function signInInBrowser(page: Page, stack: { url: string; idp: { issuer: string } }, username: string): Promise<void> {
  await page.goto(stack.url + '/');
  await page.waitForURL(/\/sign-in/);
  await page.getByRole('button', { name: 'Sign in with your hospital account' }).click();
  await page.waitForURL((url) => url.href.startsWith(stack.idp.issuer));
  await page.getByTestId('idp-username').fill(username);
  await page.getByTestId('idp-password').fill('demo');
  await page.getByTestId('idp-submit').click();
  await page.waitForURL((url) => url.href.startsWith(stack.url) && !url.pathname.startsWith('/sign-in') && !url.pathname.startsWith('/api'));
}
