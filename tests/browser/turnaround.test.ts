import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import type { DataSource } from 'typeorm';
import { launchBrowser, screenshotPath, signInInBrowser, viewports, visible } from '../support/browser';
import { openTestDatabase } from '../support/app';
import { turnaroundSeeder } from '../support/turnaround';
import { startStack, usernameOf, type TestStack } from '../support/stack';

// Invented physicians and studies: one physician signs within hours, the other takes days and has a
// study past the 24 h target.

let db: DataSource;
let stack: TestStack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
let overdue: { id: string; accession: string };
const tag = randomUUID().slice(0, 6).toUpperCase();
const lateName = `Dr Slowhand ${tag}`;
const DAY = 24 * 3_600_000;

beforeAll(async () => {
  db = await openTestDatabase();
  const { user, seedStudy } = turnaroundSeeder(db, tag);
  const late = await user(lateName, 'physician', null);
  const prompt = await user(`Dr Swift ${tag}`, 'physician', null);
  const now = Date.now();
  // A pressure-wire vessel with a drift check (Pd/Pa at the guide tip) and thermodilution injections.
  const vessel = (drift: number | null, restInjections: number) => {
    const id = randomUUID();
    const rest = Array.from({ length: restInjections }, () => 0.9);
    return {
      snapshot: { id, vessel: 'LAD', restPa: 100, restPd: 95, hyperemiaPa: 90, hyperemiaPd: 72, driftPdPa: drift, restTransit: rest, hyperemiaTransit: [0.3, 0.3, 0.3] },
      input: { id, vessel: 'LAD' as const, ...(drift === null ? {} : { driftPdPa: drift }), rest: { pa: 100, pd: 95, tmn: rest }, hyperemia: { pa: 90, pd: 72, tmn: [0.3, 0.3, 0.3] } },
    };
  };
  for (let i = 0; i < 6; i++) {
    await seedStudy({ operatorId: late, endedAt: new Date(now - (8 + i * 9) * DAY), signedAfterH: 40 + i * 12, codedAfterSignH: 20, deliveredAfterSignH: 1, vessels: [vessel(i % 3 === 0 ? null : 0.97 + i * 0.01, 2 + (i % 2))] });
    await seedStudy({ operatorId: prompt, endedAt: new Date(now - (9 + i * 9) * DAY), signedAfterH: 3 + i, codedAfterSignH: 8, deliveredAfterSignH: 1, vessels: [vessel(0.99 + (i % 3) * 0.01, 3)] });
  }
  overdue = await seedStudy({ operatorId: late, endedAt: new Date(now - 3 * DAY) });
  stack = await startStack(db);
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await stack?.close();
  await db?.destroy();
});

/** Script files the page downloaded, by name, with their transferred bytes (resource timing). */
const scriptsOf = (page: Page) =>
  page.evaluate(() =>
    (performance.getEntriesByType('resource') as PerformanceResourceTiming[])
      .filter((e) => e.name.includes('/_expo/static/js/'))
      .map((e) => ({ name: e.name.split('/').pop()!, bytes: e.transferSize || e.encodedBodySize })),
  );

describe('the chief’s turnaround page', () => {
  it('on a phone: spots the late physician, opens the overdue study', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('chief'));
      expect(new URL(page.url()).pathname).toBe('/turnaround');
      const table = visible(page, 'physician-table');
      await table.waitFor();
      const lateRow = table.getByRole('row').filter({ hasText: lateName });
      // Overdue and slow: both figures carry the alert mark.
      await expect(lateRow.innerText()).resolves.toMatch(/▲ 1/);
      await visible(page, 'trend-chart').waitFor();
      await page.screenshot({ path: screenshotPath('turnaround-figures-phone') });
      // The page scrolls inside the app shell: a tall window shows all of it in one picture.
      await page.setViewportSize({ width: viewports.phone.width, height: 4600 });
      await page.waitForTimeout(300);
      await page.screenshot({ path: screenshotPath('turnaround-figures-phone-full') });
      await page.setViewportSize(viewports.phone);
      // The charts arrived as their own script, after the first load.
      const scripts = await scriptsOf(page);
      expect(scripts.some((s) => s.name.startsWith('figures-view'))).toBe(true);

      const row = visible(page, `study-row-${overdue.accession}`);
      await expect(visible(page, `wait-${overdue.accession}`).innerText()).resolves.toContain(`Owner: ${lateName}`);
      await expect(visible(page, `wait-${overdue.accession}`).innerText()).resolves.toContain('Overdue');
      await row.click();
      await page.waitForURL((url) => url.pathname === `/studies/${overdue.id}`);
    } finally {
      await context.close();
    }
  });

  it('on a desktop: charts beside their tables, a custom range, the CSV link of the range', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.desktop });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('chief'));
      await visible(page, 'trend-chart').waitFor();
      const chart = (await visible(page, 'trend-chart').boundingBox())!;
      const tableBox = (await visible(page, 'trend-table').boundingBox())!;
      expect(tableBox.x).toBeGreaterThan(chart.x + chart.width - 1); // beside, not below
      await page.screenshot({ path: screenshotPath('turnaround-figures-desktop') });
      await page.setViewportSize({ width: viewports.desktop.width, height: 2600 });
      await page.waitForTimeout(300);
      await page.screenshot({ path: screenshotPath('turnaround-figures-desktop-full') });
      await page.setViewportSize(viewports.desktop);

      await visible(page, 'range-custom').click();
      await visible(page, 'range-from').fill('2003-02-30');
      await expect(visible(page, 'range-error').innerText()).resolves.toContain('from must be a date');
      const from = new Date(Date.now() - 40 * DAY).toISOString().slice(0, 10);
      const to = new Date().toISOString().slice(0, 10);
      await visible(page, 'range-from').fill(from);
      await visible(page, 'range-to').fill(to);
      const href = await visible(page, 'export-csv').getAttribute('href');
      expect(href).toBe(`/api/turnaround/export?from=${from}&to=${to}`);
      const csv = await page.evaluate(async (url) => (await fetch(url)).text(), href!);
      expect(csv.split('\r\n')[0]).toMatch(/^accession,state,/);
      expect(csv).toContain(overdue.accession);
    } finally {
      await context.close();
    }
  });

  it('keeps the chart code out of the worklist’s first load', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('staff'));
      await page.getByRole('heading', { level: 1, name: 'Worklist' }).waitFor();
      const scripts = await scriptsOf(page);
      console.log(`worklist first-load scripts: ${scripts.map((s) => `${s.name} ${s.bytes} B`).join(', ')}`);
      expect(scripts.some((s) => s.name.startsWith('entry'))).toBe(true);
      expect(scripts.some((s) => s.name.startsWith('figures-view'))).toBe(false);
    } finally {
      await context.close();
    }
  });
});
