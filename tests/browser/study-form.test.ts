import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import type { DataSource } from 'typeorm';
import { launchBrowser, screenshotPath, signInInBrowser, viewports, visible } from '../support/browser';
import { openTestDatabase } from '../support/app';
import { startStack, usernameOf, type TestStack } from '../support/stack';

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

const signInAs = (page: Page, role: 'staff' | 'physician') => signInInBrowser(page, stack, usernameOf(role));

const mrn = `BR-${Date.now().toString(36).toUpperCase()}`;

/** Opens the study of this exact MRN from the worklist search (the search runs after a pause). */
async function openByMrn(page: Page, which: string) {
  await visible(page, 'worklist-search').fill(which);
  const row = page.locator('[data-testid^="study-row-"]:visible', { hasText: `MRN ${which} ·` });
  await row.first().waitFor();
  await row.first().locator('[data-testid^="open-"]').click();
  await page.waitForURL(/\/studies\/[0-9a-f-]{36}$/);
}

describe('the structured study form on a phone', () => {
  it('creates a study, enters a vessel with pressures and injections, shows CFR and IMR, and keeps everything over a reload', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    // A step that never happens fails with its locator, well inside the test's own limit.
    page.setDefaultTimeout(12_000);
    try {
      await signInAs(page, 'staff');
      await visible(page, 'new-study').click();
      await page.waitForURL(/\/studies\/new$/);
      await visible(page, 'new-mrn').fill(mrn);
      await visible(page, 'new-birth-date').fill('1971-05-30');
      await visible(page, 'new-family-name').fill('Okafor-Brandt');
      await visible(page, 'new-given-name').fill('Renata');
      await visible(page, 'new-sex-female').click();
      await visible(page, 'new-indication').fill('Angina with no obstructive disease on CT');
      await visible(page, 'new-question-angina-no-obstruction').click();
      await visible(page, 'new-study-submit').click();
      await page.waitForURL(/\/studies\/[0-9a-f-]{36}\/setup$/);
      const studyUrl = page.url().replace(/\/setup$/, '');

      // Numbers get the numeric keyboard and carry their unit.
      await visible(page, 'drift-check').waitFor();
      await visible(page, 'section-vessels').click();
      await page.waitForURL(/\/vessels$/);
      await visible(page, 'add-vessel').click();
      await visible(page, 'add-vessel-LAD').click();
      // Until the pull-back check is entered, every section's header says so (common practice: repeat when drift is out of range).
      await expect(visible(page, 'drift-alert').innerText()).resolves.toMatch(/Drift check missing for LAD/);
      const restPa = visible(page, 'vessel-0-rest-pa');
      expect(await restPa.getAttribute('inputmode')).toBe('decimal');
      // Rest and hyperaemia boxes share the visible label "Pa": screen readers hear them apart.
      expect(await restPa.getAttribute('aria-label')).toBe('Pa at rest in mmHg');
      expect(await visible(page, 'vessel-0-hyp-pa').getAttribute('aria-label')).toBe('Pa at hyperaemia in mmHg');
      // Hand-computed from the published formulas (CFR = Tmn rest / Tmn hyp, EAPCI 2020; IMR = Pd × Tmn, Yong et al.): CFR 0.90 / 0.30 = 3.00, IMR 72 × 0.30 = 21.6,
      // corrected without wedge 20.52 because FFR 72/90 = 0.80 is abnormal (≤ 0.80, ESC 2024).
      await restPa.fill('100');
      await visible(page, 'vessel-0-rest-pd').fill('95');
      for (const [i, t] of ['0.9', '0.9', '0.9'].entries()) await visible(page, `vessel-0-rest-tmn-${i}`).fill(t);
      await visible(page, 'vessel-0-hyp-pa').fill('90');
      await visible(page, 'vessel-0-hyp-pd').fill('72');
      for (const [i, t] of ['0.3', '0.3', '0.3'].entries()) await visible(page, `vessel-0-hyp-tmn-${i}`).fill(t);
      await visible(page, 'vessel-0-drift').fill('1.03');
      await expect(visible(page, 'drift-alert').innerText()).resolves.toMatch(/outside 0\.98–1\.02 for LAD/);
      await visible(page, 'vessel-0-drift').fill('1.00');
      await expect.poll(() => visible(page, 'drift-alert').count()).toBe(0);

      await expect(visible(page, 'vessel-0-results-cfr-value').innerText()).resolves.toBe('3.00');
      // IMR is shown and judged as a whole number: 20.52 → 21.
      await expect(visible(page, 'vessel-0-results-imr-value').innerText()).resolves.toMatch(/^21( |$)/);
      await expect(visible(page, 'vessel-0-results-ffr-flag').innerText()).resolves.toBe('▲ Abnormal');
      await expect(visible(page, 'vessel-0-results-cfr-flag').innerText()).resolves.toBe('✓ Normal');
      await expect(visible(page, 'study-results-caution').innerText()).resolves.toMatch(/Decision support only/);

      // Autosave, no button: wait for the saved state, then reload.
      await visible(page, 'save-status-saved').waitFor({ timeout: 10_000 });
      await page.screenshot({ path: screenshotPath('study-vessels-phone'), fullPage: false });
      await page.reload();
      await visible(page, 'vessel-0-rest-pa').waitFor();
      expect(await visible(page, 'vessel-0-rest-pa').inputValue()).toBe('100');
      expect(await visible(page, 'vessel-0-hyp-tmn-2').inputValue()).toBe('0.3');
      // A ratio comes back at its display precision, as typed (ratios to 2 decimals: ESC 2024 reports FFR as 0.80).
      expect(await visible(page, 'vessel-0-drift').inputValue()).toBe('1.00');
      // The keyboard focus ring goes round the whole box, unit included, not the inner input.
      await visible(page, 'vessel-0-rest-pd').focus();
      await page.keyboard.press('Shift+Tab');
      const ring = await visible(page, 'vessel-0-rest-pa').evaluate((input) => ({
        box: getComputedStyle(input.closest('[data-focus-ring="within"]')!).outlineStyle,
        input: getComputedStyle(input).outlineStyle,
      }));
      expect(ring).toEqual({ box: 'solid', input: 'none' });
      await expect(visible(page, 'vessel-0-results-cfr-value').innerText()).resolves.toBe('3.00');
      const [row] = await db.query(
        `SELECT count(*)::int AS n FROM thermodilution_injection i JOIN vessel_assessment v ON v.id = i.vessel_assessment_id JOIN study s ON s.id = v.study_id JOIN patient p ON p.id = s.patient_id WHERE p.mrn = $1`,
        [mrn],
      );
      expect(row.n).toBe(6);

      // The same study on a wide screen: side navigation and the live result beside the form.
      await page.setViewportSize(viewports.desktop);
      await page.goto(studyUrl + '/vessels');
      await visible(page, 'vessel-0-results-cfr-value').waitFor();
      await visible(page, 'study-results-headline').waitFor();
      await page.screenshot({ path: screenshotPath('study-vessels-desktop') });
      await page.goto(studyUrl + '/setup');
      await visible(page, 'drift-check').waitFor();
      await page.screenshot({ path: screenshotPath('study-setup-desktop') });
      // Yes / No / Not recorded is one radio group: arrow keys move the choice (WAI-ARIA APG radio group pattern).
      await visible(page, 'setup-zeroed-true').click();
      await page.keyboard.press('ArrowRight');
      await expect.poll(() => visible(page, 'setup-zeroed-false').getAttribute('aria-checked')).toBe('true');
      expect(await visible(page, 'setup-zeroed-true').getAttribute('aria-checked')).toBe('false');
      // An empty procedure time shows the format, never a made-up time that could pass for data.
      await page.goto(studyUrl);
      const start = visible(page, 'details-started');
      await start.waitFor();
      expect(await start.inputValue()).toBe('');
      expect(await start.getAttribute('placeholder')).toBe('YYYY-MM-DD HH:MM');
      await expect(page.locator('#details-started-help:visible').innerText()).resolves.toMatch(/Not recorded yet/);
    } finally {
      await context.close();
    }
  }, 120_000);

  it('keeps edits typed while offline and sends them when the network returns', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    // A step that never happens fails with its locator, well inside the test's own limit.
    page.setDefaultTimeout(12_000);
    try {
      await signInAs(page, 'staff');
      await openByMrn(page, mrn);
      await visible(page, 'section-findings').click();
      await context.setOffline(true);
      await visible(page, 'findings-complications').fill('None');
      await visible(page, 'save-status-offline').waitFor({ timeout: 10_000 });
      await page.screenshot({ path: screenshotPath('study-offline-phone') });
      await context.setOffline(false);
      await visible(page, 'save-status-saved').waitFor({ timeout: 15_000 });
      const [row] = await db.query(`SELECT s.complications FROM study s JOIN patient p ON p.id = s.patient_id WHERE p.mrn = $1`, [mrn]);
      expect(row.complications).toBe('None');
    } finally {
      await context.close();
    }
  });

  it('records an angina-without-obstruction work-up with acetylcholine doses and shows the endotype', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    // A step that never happens fails with its locator, well inside the test's own limit.
    page.setDefaultTimeout(12_000);
    try {
      await signInAs(page, 'physician');
      await visible(page, 'new-study').click();
      await visible(page, 'new-mrn').fill(`${mrn}-CFT`);
      await visible(page, 'new-birth-date').fill('1969-02-11');
      await visible(page, 'new-family-name').fill('Varsamis');
      await visible(page, 'new-given-name').fill('Thea');
      await visible(page, 'new-sex-female').click();
      await visible(page, 'new-study-submit').click();
      await page.waitForURL(/\/setup$/);
      await visible(page, 'section-vessels').click();
      await visible(page, 'add-vessel').click();
      await visible(page, 'add-vessel-LAD').click();
      // Hand-computed from the published formulas: FFR 80/90 = 0.89 (normal, > 0.80, ESC 2024);
      // CFR 0.80 / 0.50 = 1.60 (abnormal, < 2.0, EAPCI 2020); IMR 80 × 0.50 = 40 (abnormal, ≥ 25, ESC 2024).
      const fill = async (id: string, v: string) => visible(page, id).fill(v);
      await fill('vessel-0-rest-pa', '95');
      await fill('vessel-0-rest-pd', '90');
      for (const i of [0, 1, 2]) await fill(`vessel-0-rest-tmn-${i}`, '0.8');
      await fill('vessel-0-hyp-pa', '90');
      await fill('vessel-0-hyp-pd', '80');
      for (const i of [0, 1, 2]) await fill(`vessel-0-hyp-tmn-${i}`, '0.5');
      await fill('vessel-0-drift', '0.99');
      await expect(visible(page, 'vessel-0-results-imr-value').innerText()).resolves.toMatch(/^40( |$)/);
      // Angina is not recorded in this study, so the finding is named without "angina" (COVADIS: Ong et al., Int J Cardiol 2018).
      await expect(visible(page, 'study-results-headline').innerText()).resolves.toMatch(/^Structural coronary microvascular dysfunction \(low CFR, raised IMR\) in LAD/);

      await visible(page, 'section-vasoreactivity').click();
      await page.waitForURL(/\/vasoreactivity$/);
      // The protocol's doses are offered in order (ESC 2024 protocol: 2, 20, 100, 200 µg).
      await visible(page, 'add-dose').click();
      expect(await visible(page, 'dose-0-micrograms').inputValue()).toBe('2');
      await fill('dose-0-constriction', '10');
      await visible(page, 'dose-0-symptoms-false').click();
      await visible(page, 'dose-0-ecg-false').click();
      await visible(page, 'add-dose').click();
      expect(await visible(page, 'dose-1-micrograms').inputValue()).toBe('20');
      await visible(page, 'add-dose').click();
      expect(await visible(page, 'dose-2-micrograms').inputValue()).toBe('100');
      // Epicardial spasm (COVADIS): ≥ 90% constriction with the usual symptoms and ischaemic ECG changes.
      await fill('dose-2-constriction', '95');
      await visible(page, 'dose-2-symptoms-true').click();
      await visible(page, 'dose-2-ecg-true').click();
      await visible(page, 'dose-1-remove').click();
      await visible(page, 'dose-1-remove-confirm').click();
      await expect(visible(page, 'dose-1-result').innerText()).resolves.toBe('This dose: epicardial spasm');
      // The first dose (10%, no symptoms, no ECG change) keeps its own outcome on its own card (COVADIS).
      await expect(visible(page, 'dose-0-result').innerText()).resolves.toBe('This dose: negative');
      await expect(visible(page, 'acetylcholine-summary').innerText()).resolves.toBe('Acetylcholine test overall: epicardial spasm');
      await expect(visible(page, 'study-results-headline').innerText()).resolves.toMatch(/^Structural coronary microvascular dysfunction .* in LAD and epicardial coronary spasm/);
      await visible(page, 'dose-nitrate-reversal-true').click();
      await visible(page, 'save-status-saved').waitFor({ timeout: 10_000 });
      await page.screenshot({ path: screenshotPath('study-vasoreactivity-phone') });
      const doses = await db.query(
        `SELECT d.micrograms::float8 AS ug, d.constriction_pct::float8 AS pct FROM acetylcholine_dose d JOIN study s ON s.id = d.study_id JOIN patient p ON p.id = s.patient_id WHERE p.mrn = $1 ORDER BY d.position`,
        [`${mrn}-CFT`],
      );
      expect(doses).toEqual([
        { ug: 2, pct: 10 },
        { ug: 100, pct: 95 },
      ]);
    } finally {
      await context.close();
    }
  });

  it('restores edits that never reached the server after a reload, sends them, and clears drafts at sign-out', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    // A step that never happens fails with its locator, well inside the test's own limit.
    page.setDefaultTimeout(12_000);
    try {
      await signInAs(page, 'staff');
      await openByMrn(page, mrn);
      const studyUrl = page.url();
      await visible(page, 'section-findings').click();
      // Saves fail (the server cannot be reached) while the page itself still loads.
      await page.route('**/api/studies/*', (route) => (route.request().method() === 'PATCH' ? route.abort('internetdisconnected') : route.continue()));
      await visible(page, 'findings-plan').fill('Repeat testing in 6 months');
      await visible(page, 'save-status-offline').waitFor({ timeout: 10_000 });
      await page.reload();
      await visible(page, 'findings-plan').waitFor();
      expect(await visible(page, 'findings-plan').inputValue()).toBe('Repeat testing in 6 months');
      const stored = await page.evaluate(() => Object.keys(localStorage).filter((k) => k.startsWith('isobar.draft.')).length);
      expect(stored).toBe(1);
      await page.unroute('**/api/studies/*');
      await visible(page, 'save-status-saved').waitFor({ timeout: 15_000 });
      const [row] = await db.query(`SELECT s.plan FROM study s JOIN patient p ON p.id = s.patient_id WHERE p.mrn = $1`, [mrn]);
      expect(row.plan).toBe('Repeat testing in 6 months');
      await page.goto(studyUrl + '/findings');
      await visible(page, 'findings-plan').waitFor();
      await visible(page, 'sign-out-button').click();
      await page.waitForURL((url) => url.pathname === '/sign-in');
      // No draft and no tab mark stays behind (only the sign-out signal for other tabs, which holds a time).
      const left = await page.evaluate(() => Object.keys(localStorage).filter((k) => k.startsWith('isobar.') && k !== 'isobar.signed-out'));
      expect(left).toEqual([]);
    } finally {
      await context.close();
    }
  });

  it('holds back a section with text in a number box instead of saving the last good number', async () => {
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    // A step that never happens fails with its locator, well inside the test's own limit.
    page.setDefaultTimeout(12_000);
    try {
      await signInAs(page, 'staff');
      await openByMrn(page, mrn);
      await visible(page, 'section-findings').click();
      await visible(page, 'findings-contrast').fill('120');
      await visible(page, 'save-status-saved').waitFor({ timeout: 10_000 });
      await visible(page, 'findings-contrast').fill('12O');
      await visible(page, 'findings-contrast-error').waitFor();
      await visible(page, 'save-status-invalid').waitFor({ timeout: 10_000 });
      expect(await visible(page, 'findings-contrast').getAttribute('aria-invalid')).toBe('true');
      expect(await visible(page, 'findings-contrast').getAttribute('aria-describedby')).toBe('findings-contrast-help');
      const [row] = await db.query(`SELECT s.contrast_ml::float8 AS c FROM study s JOIN patient p ON p.id = s.patient_id WHERE p.mrn = $1`, [mrn]);
      expect(row.c).toBe(120);
      await visible(page, 'findings-contrast').fill('125');
      await visible(page, 'save-status-saved').waitFor({ timeout: 10_000 });
    } finally {
      await context.close();
    }
  });
});
