import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { BrowserContext, Page } from 'playwright-core';
import type { DataSource } from 'typeorm';
import { launchBrowser, screenshotPath, signInInBrowser, viewports, visible } from '../support/browser';
import { openTestDatabase } from '../support/app';
import { createStudy } from '../support/factories';
import { startStack, usernameOf, type TestStack } from '../support/stack';

let db: DataSource;
let stack: TestStack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
let context: BrowserContext;
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'isobar-files-'));

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
  browser = await launchBrowser();
  context = await browser.context.browser()!.newContext({ viewport: viewports.desktop });
  const page = await context.newPage();
  await signInInBrowser(page, stack, usernameOf('physician'));
  await page.close();
});
afterAll(async () => {
  await context?.close();
  await browser?.close();
  await stack?.close();
  await db?.destroy();
  fs.rmSync(tmp, { recursive: true, force: true });
});


describe('the same study open in two tabs', () => {
  // Three-way merge against the version both tabs started from (common practice in version control):
  // a field changed by one tab only keeps that change, whichever tab saves last.
  it('merges field by field: edits to different fields of one section both survive, with no choice to make', async () => {
    const study = await createStudy(db);
    const a = await context.newPage();
    const b = await context.newPage();
    for (const p of [a, b]) {
      await p.goto(`${stack.url}/studies/${study.id}/findings`);
      await visible(p, 'findings-impression').waitFor();
    }
    await visible(a, 'findings-plan').fill('Plan from tab A');
    await visible(a, 'save-status-saved').waitFor({ timeout: 10_000 });
    // Tab B still holds version 1 and edits another field of the same section.
    await visible(b, 'findings-impression').fill('Impression from tab B');
    await expect.poll(async () => (await db.query(`SELECT impression FROM study WHERE id = $1`, [study.id]))[0].impression, { timeout: 15_000 }).toBe('Impression from tab B');
    const [row] = await db.query(`SELECT impression, plan, version FROM study WHERE id = $1`, [study.id]);
    expect(row).toEqual({ impression: 'Impression from tab B', plan: 'Plan from tab A', version: 3 });
    await expect(visible(b, 'save-status-saved').innerText()).resolves.toMatch(/merged with changes saved elsewhere \(version 2\)/);
    expect(await visible(b, 'conflict-banner').count()).toBe(0);
    await expect.poll(() => visible(b, 'findings-plan').inputValue()).toBe('Plan from tab A');
    await a.close();
    await b.close();
  });

  it('shows both values where both tabs changed the same field, and saves the one chosen with the rest merged', async () => {
    const study = await createStudy(db);
    const a = await context.newPage();
    const b = await context.newPage();
    for (const p of [a, b]) {
      await p.goto(`${stack.url}/studies/${study.id}/setup`);
      await visible(p, 'setup-heparin').waitFor();
    }
    await visible(a, 'setup-heparin').fill('5000');
    await visible(a, 'save-status-saved').waitFor({ timeout: 10_000 });
    await visible(b, 'setup-nitrate-dose').fill('200');
    await visible(b, 'setup-heparin').fill('7000');
    await visible(b, 'conflict-banner').waitFor({ timeout: 10_000 });
    await expect(visible(b, 'conflict-0').innerText()).resolves.toMatch(/Setup › Heparin/);
    await expect(visible(b, 'conflict-0-theirs-value').innerText()).resolves.toBe('5000');
    await expect(visible(b, 'conflict-0-mine-value').innerText()).resolves.toBe('7000');
    await b.screenshot({ path: screenshotPath('study-conflict-desktop') });
    // Nothing is written until the person chooses.
    expect((await db.query(`SELECT heparin_units::float8 AS h FROM study WHERE id = $1`, [study.id]))[0].h).toBe(5000);
    expect(await visible(b, 'conflict-apply').isDisabled()).toBe(true);
    await visible(b, 'conflict-0-theirs').click();
    await visible(b, 'conflict-apply').click();
    await expect
      .poll(async () => (await db.query(`SELECT heparin_units::float8 AS h, nitrate_dose_ug::float8 AS n FROM study WHERE id = $1`, [study.id]))[0], { timeout: 10_000 })
      .toEqual({ h: 5000, n: 200 });
    await expect.poll(() => visible(b, 'setup-heparin').inputValue()).toBe('5000');
    await a.close();
    await b.close();
  });

  it('can take the saved version instead, dropping the local edit', async () => {
    const study = await createStudy(db);
    const a = await context.newPage();
    const b = await context.newPage();
    for (const p of [a, b]) {
      await p.goto(`${stack.url}/studies/${study.id}/findings`);
      await visible(p, 'findings-impression').waitFor();
    }
    await visible(a, 'findings-impression').fill('Saved by A');
    await visible(a, 'save-status-saved').waitFor({ timeout: 10_000 });
    await visible(b, 'findings-impression').fill('Typed by B');
    await visible(b, 'conflict-banner').waitFor({ timeout: 10_000 });
    await visible(b, 'conflict-load-saved').click();
    await expect.poll(() => visible(b, 'findings-impression').inputValue()).toBe('Saved by A');
    const [row] = await db.query(`SELECT impression FROM study WHERE id = $1`, [study.id]);
    expect(row.impression).toBe('Saved by A');
    await a.close();
    await b.close();
  });
});

describe('a section the server refuses', () => {
  it('is held back with its field error, while the other sections keep saving', async () => {
    const first = await createStudy(db);
    const [second] = await db.query(
      `INSERT INTO study (accession, patient_id, state) SELECT 'HB-' || substr(md5(random()::text), 1, 8), patient_id, 'draft' FROM study WHERE id = $1 RETURNING id`,
      [first.id],
    );
    const page = await context.newPage();
    await page.goto(`${stack.url}/studies/${second.id}`);
    await visible(page, 'patient-given-name').fill('Adelheid');
    // The patient has another study: their name is not changed from this one.
    await expect(visible(page, 'patient-given-name-error').innerText()).resolves.toMatch(/other studies/);
    await visible(page, 'section-findings').click();
    await visible(page, 'findings-impression').fill('Normal coronary function');
    await expect.poll(async () => (await db.query(`SELECT impression FROM study WHERE id = $1`, [second.id]))[0].impression, { timeout: 10_000 }).toBe('Normal coronary function');
    await visible(page, 'save-status-invalid').waitFor();
    const [patient] = await db.query(`SELECT given_name FROM patient p JOIN study s ON s.patient_id = p.id WHERE s.id = $1`, [first.id]);
    expect(patient.given_name).toBe('Ada');
    await page.close();
  });
});

describe('one bad box in a vessel', () => {
  // A pressure cannot be negative (common practice; the record's hard limits).
  it('is held back and outlined while the vessel\'s other values are saved', async () => {
    const study = await createStudy(db);
    const page = await context.newPage();
    await page.goto(`${stack.url}/studies/${study.id}/vessels`);
    await visible(page, 'add-vessel').click();
    await visible(page, 'add-vessel-LAD').click();
    await visible(page, 'vessel-0-rest-pa').fill('-5');
    await visible(page, 'vessel-0-rest-pd').fill('80');
    await visible(page, 'vessel-0-hyp-pd').fill('70');
    await expect
      .poll(async () => (await db.query(`SELECT rest_pa::float8 AS pa, rest_pd::float8 AS pd, hyperemia_pd::float8 AS hpd FROM vessel_assessment WHERE study_id = $1`, [study.id]))[0], { timeout: 10_000 })
      .toEqual({ pa: null, pd: 80, hpd: 70 });
    await visible(page, 'save-status-invalid').waitFor();
    expect(await visible(page, 'vessel-0-rest-pa').getAttribute('aria-invalid')).toBe('true');
    expect(await visible(page, 'vessel-0-rest-pd').getAttribute('aria-invalid')).not.toBe('true');
    await page.screenshot({ path: screenshotPath('study-held-field-desktop') });
    // Corrected, it goes too.
    await visible(page, 'vessel-0-rest-pa').fill('95');
    await expect.poll(async () => (await db.query(`SELECT rest_pa::float8 AS pa FROM vessel_assessment WHERE study_id = $1`, [study.id]))[0].pa, { timeout: 10_000 }).toBe(95);
    await visible(page, 'save-status-saved').waitFor();
    await page.close();
  });
});

describe('a role that may read but not change studies', () => {
  // Roles and permissions: the product's own permission table (study:write is staff and physician).
  it('sees the study read only, and edits left on the device are dropped with a message', async () => {
    const study = await createStudy(db);
    const coderContext = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await coderContext.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('coder'));
      await page.goto(`${stack.url}/studies/${study.id}/findings`);
      await visible(page, 'findings-impression').waitFor();
      await expect(visible(page, 'read-only-note').innerText()).resolves.toMatch(/Read only/);
      expect(await visible(page, 'findings-impression').isEditable()).toBe(false);
      await page.screenshot({ path: screenshotPath('study-read-only-phone') });
      // An edit kept on this device from before (typed when the form was open to every role).
      await page.evaluate(async (studyId) => {
        const me = await (await fetch('/api/me')).json();
        const tab = sessionStorage.getItem('isobar.tab');
        const record = await (await fetch(`/api/studies/${studyId}`)).json();
        const sections = { patient: record.patient, details: record.details, setup: record.setup, vessels: record.vessels, vasoreactivity: record.vasoreactivity, findings: record.findings };
        const draft = { studyId, userId: me.id, tabId: tab, baseVersion: record.version, base: sections, sections: { ...sections, findings: { ...sections.findings, impression: 'Typed by the coder' } }, savedAt: Date.now() };
        localStorage.setItem(`isobar.draft.${studyId}.${tab}`, JSON.stringify(draft));
      }, study.id);
      await page.reload();
      await visible(page, 'edits-dropped').waitFor();
      expect(await visible(page, 'findings-impression').inputValue()).toBe('');
      const left = await page.evaluate(() => Object.keys(localStorage).filter((k) => k.startsWith('isobar.draft.')));
      expect(left).toEqual([]);
      await page.reload();
      await visible(page, 'findings-impression').waitFor();
      expect(await visible(page, 'edits-dropped').count()).toBe(0);
    } finally {
      await coderContext.close();
    }
  });
});

describe('attachments from the browser', () => {
  it('uploads a PDF, and refuses a file renamed to .pdf that is not one', async () => {
    const study = await createStudy(db);
    const page = await context.newPage();
    await page.goto(`${stack.url}/studies/${study.id}/attachments`);
    await visible(page, 'attachments-empty').waitFor();
    const real = path.join(tmp, 'console-printout.pdf');
    fs.writeFileSync(real, '%PDF-1.4\n1 0 obj << /Type /Catalog >> endobj\ntrailer << /Root 1 0 R >>\n%%EOF\n');
    const fake = path.join(tmp, 'not-really.pdf');
    fs.writeFileSync(fake, Buffer.from([0x4d, 0x5a, 0x90, 0x00, 0x03, 0x00, 0x00, 0x00, 0x04, 0x00, 0x00, 0x00, 0xff, 0xff]));

    for (const file of [real, fake]) {
      const chooser = page.waitForEvent('filechooser');
      await visible(page, 'attach-file').click();
      await (await chooser).setFiles(file);
      await visible(page, 'attachment-message').waitFor();
      await expect.poll(() => visible(page, 'upload-progress').count()).toBe(0);
      if (file === real) await visible(page, 'attachment-console-printout.pdf').waitFor();
    }
    await expect(visible(page, 'attachment-message').innerText()).resolves.toMatch(/not-really\.pdf" is not a PDF, PNG, JPEG or CSV file/);
    await page.screenshot({ path: screenshotPath('study-attachments-desktop') });
    const rows = await db.query(`SELECT file_name, media_type FROM attachment WHERE study_id = $1`, [study.id]);
    expect(rows).toEqual([{ file_name: 'console-printout.pdf', media_type: 'application/pdf' }]);
    await page.close();
  });
});
