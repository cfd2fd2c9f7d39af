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
  it('never overwrites silently: the stale tab chooses, and keeping its edits keeps the other tab\'s sections too', async () => {
    const study = await createStudy(db);
    const a = await context.newPage();
    const b = await context.newPage();
    await a.goto(`${stack.url}/studies/${study.id}/findings`);
    await b.goto(`${stack.url}/studies/${study.id}/setup`);
    await visible(a, 'findings-impression').waitFor();
    await visible(b, 'setup-heparin').waitFor();

    await visible(a, 'findings-impression').fill('Impression from tab A');
    await visible(a, 'save-status-saved').waitFor({ timeout: 10_000 });
    // Tab B still holds version 1 and edits another section.
    await visible(b, 'setup-heparin').fill('5000');
    await visible(b, 'conflict-banner').waitFor({ timeout: 10_000 });
    await b.screenshot({ path: screenshotPath('study-conflict-desktop') });
    const before = await db.query(`SELECT heparin_units FROM study WHERE id = $1`, [study.id]);
    expect(before[0].heparin_units).toBeNull();
    await visible(b, 'conflict-keep-mine').click();
    await visible(b, 'save-status-saved').waitFor({ timeout: 10_000 });
    const [row] = await db.query(`SELECT impression, heparin_units::float8 AS heparin, version FROM study WHERE id = $1`, [study.id]);
    expect(row).toEqual({ impression: 'Impression from tab A', heparin: 5000, version: 3 });
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
