import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { launchBrowser, screenshotPath, signInInBrowser, viewports, visible } from '../support/browser';
import { openOwnerDatabase, openTestDatabase } from '../support/app';
import { createStudy } from '../support/factories';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

let db: DataSource;
let stack: TestStack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
let study: Awaited<ReturnType<typeof createStudy>>;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
  browser = await launchBrowser();
  study = await createStudy(db);
  const staff = await signIn(stack, usernameOf('staff'));
  await request(stack.url).get(`/api/studies/${study.id}`).set('Cookie', staff.cookie).expect(200);
  // 60 older events on the study, so its trail runs past the first page of 50.
  const owner = await openOwnerDatabase();
  try {
    await owner.query(
      `INSERT INTO audit_event (recorded_at, action, entity_type, entity_id, actor_name, actor_role, outcome, client_address)
       SELECT now() - i * interval '1 hour', CASE WHEN i % 7 = 0 THEN 'update' ELSE 'read' END, 'study', $1, 'Ines Varga, RN', 'staff',
              CASE WHEN i % 13 = 0 THEN 'failure' ELSE 'success' END, '10.20.30.' || (i % 200)
       FROM generate_series(1, 60) i`,
      [study.id],
    );
  } finally {
    await owner.destroy();
  }
});
afterAll(async () => {
  await browser?.close();
  await stack?.close();
  await db?.destroy();
});

describe('the audit trail screen', () => {
  for (const [name, viewport] of Object.entries(viewports)) {
    it(`searches by patient, loads more, offers both exports and fits ${viewport.width} px`, async () => {
      const context = await browser.context.browser()!.newContext({ viewport });
      const page = await context.newPage();
      try {
        await signInInBrowser(page, stack, usernameOf('chief'));
        await page.goto(`${stack.url}/audit`);
        const patient = visible(page, 'audit-filter-patient');
        await patient.fill(study.patient.mrn.toLowerCase());
        await patient.press('Enter');
        const rows = page.locator('[data-testid^="audit-row-"]:visible');
        await expect.poll(() => rows.first().innerText(), { timeout: 10_000 }).toContain(`MRN ${study.patient.mrn}`);
        await expect(rows.first().innerText()).resolves.toContain('Opened');
        expect(await rows.count()).toBe(50);
        // The filters are in the address: a reload shows the same search.
        expect(page.url()).toContain(`patient=${study.patient.mrn.toLowerCase()}`);

        if (name === 'desktop') {
          // A real table: each column has a header a screen reader announces.
          for (const column of ['When', 'Action', 'User', 'Record', 'From']) await expect(page.getByRole('columnheader', { name: column }).count()).resolves.toBe(1);
        }
        expect(await page.evaluate(() => document.documentElement.scrollWidth)).toBeLessThanOrEqual(viewport.width);
        await page.screenshot({ path: screenshotPath(`audit-${name}`) });

        await visible(page, 'audit-more').click();
        await expect.poll(() => rows.count(), { timeout: 10_000 }).toBe(61);
        const ids = await rows.evaluateAll((els) => els.map((e) => e.getAttribute('data-testid')));
        expect(new Set(ids).size).toBe(61);
        await visible(page, 'audit-end').waitFor();
        await expect(visible(page, 'audit-summary').innerText()).resolves.toMatch(/61 events shown \(filtered\)/);
        await page.screenshot({ path: screenshotPath(`audit-${name}-more`), fullPage: true });

        // Both exports carry the filters applied; the CSV download holds the patient's events.
        const csvHref = await visible(page, 'audit-export-csv').getAttribute('href');
        const fhirHref = await visible(page, 'audit-export-fhir').getAttribute('href');
        expect(csvHref).toContain('format=csv');
        expect(fhirHref).toContain('format=fhir');
        // A download link (the browser saves the file), read here with the page's own session.
        await expect(visible(page, 'audit-export-csv').getAttribute('download')).resolves.not.toBeNull();
        const csv = await context.request.get(`${stack.url}${csvHref}`);
        expect(csv.status()).toBe(200);
        expect(csv.headers()['content-disposition']).toMatch(/^attachment/);
        const text = await csv.text();
        expect(text.split('\r\n').filter(Boolean).length).toBe(1 + 61);
        expect(text).toContain(study.patient.mrn);
        const fhir = await context.request.get(`${stack.url}${fhirHref}`);
        expect(fhir.status()).toBe(200);
        expect((await fhir.json()).entry.length).toBe(61);
      } finally {
        await context.close();
      }
    }, 90_000);
  }

  it('says so when nothing matches, and points at a day typed wrong instead of searching', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('admin'));
      await page.goto(`${stack.url}/audit`);
      await visible(page, 'audit-filter-patient').fill('NO-SUCH-PATIENT-MRN');
      await visible(page, 'audit-search').click();
      await expect.poll(() => visible(page, 'empty-state').innerText(), { timeout: 10_000 }).toContain('No event matches these filters');

      await visible(page, 'audit-filter-from').fill('2026-13-45');
      await visible(page, 'audit-filter-from').press('Enter');
      await expect(page.getByRole('alert').first().innerText()).resolves.toContain('year-month-day');
      await expect(visible(page, 'audit-filter-from').getAttribute('aria-invalid')).resolves.toBe('true');
      await page.screenshot({ path: screenshotPath('audit-phone-empty-and-bad-day') });
    } finally {
      await context.close();
    }
  });
});
