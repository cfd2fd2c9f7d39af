import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import type { DataSource } from 'typeorm';
import { emptyFindings, emptyVessel, type StudyRecord } from '../../shared/study/schema';
import { startFakeSmtp } from '../../server/fakes/smtp';
import { startWorker, type WorkerHandle } from '../../server/jobs/worker';
import { sendReportNoticeTask } from '../../server/mail/send-report-notice';
import { launchBrowser, screenshotPath, signInInBrowser, viewports, visible } from '../support/browser';
import { openTestDatabase } from '../support/app';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

// The live report preview beside the form, the physician's signing lists and the caught-mail page.
// FFR 72/90 = 0.80 is abnormal (≤ 0.80 — ESC 2024 chronic coronary syndromes guideline).
let db: DataSource;
let stack: TestStack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
let smtp: Awaited<ReturnType<typeof startFakeSmtp>>;
let worker: WorkerHandle;
let staff: string;

beforeAll(async () => {
  db = await openTestDatabase();
  smtp = await startFakeSmtp({ port: 0, httpPort: 0 });
  stack = await startStack(db);
  stack.config.mail = { ...stack.config.mail, caughtMailUrl: smtp.listUrl };
  worker = await startWorker(
    { 'send-report-notice': sendReportNoticeTask(db, { host: '127.0.0.1', port: smtp.port, from: stack.config.mail.from, hospitalName: stack.config.hospital.name }) },
    { databaseUrl: process.env.DATABASE_URL!, pollInterval: 200, concurrency: 1 },
  );
  browser = await launchBrowser();
  staff = (await signIn(stack, usernameOf('staff'))).cookie;
});
afterAll(async () => {
  await browser?.close();
  await worker?.stop();
  await stack?.close();
  await smtp?.close();
  await db?.destroy();
});

const api = () => request(stack.url);
const send = (method: 'post' | 'patch', path: string, cookie: string) => api()[method](path).set('Cookie', cookie).set('Origin', stack.url);

async function physicianId(): Promise<string> {
  const { cookie } = await signIn(stack, usernameOf('physician'));
  return (await api().get('/api/me').set('Cookie', cookie).expect(200)).body.id;
}

/** A complete lesion study operated by `operatorId`, with the referrer's address. */
async function completeStudy(familyName: string, operatorId: string, referringEmail: string | null = null): Promise<StudyRecord> {
  const created = await send('post', '/api/studies', staff)
    .send({ patient: { mrn: `P-${randomUUID().slice(0, 8)}`, familyName, givenName: 'Noor', birthDate: '1963-03-03', sex: 'female' } })
    .expect(201);
  const res = await send('patch', `/api/studies/${created.body.id}`, staff)
    .send({
      version: created.body.version,
      details: { ...created.body.details, indication: 'Intermediate LAD lesion', clinicalQuestion: 'intermediate-lesion', operatorId, referringName: referringEmail ? 'Dr. Referrer' : null, referringEmail },
      vessels: [{ ...emptyVessel(randomUUID(), 'LAD'), restPa: 100, restPd: 95, hyperemiaPa: 90, hyperemiaPd: 72, driftPdPa: 1.0, decision: 'pci' }],
      findings: { ...emptyFindings(), complicationKinds: ['none'], impression: 'Significant LAD lesion.', plan: 'Stent.' },
    })
    .expect(200);
  return res.body;
}

async function newPage(viewport: { width: number; height: number }, role: string) {
  const context = await browser.context.browser()!.newContext({ viewport });
  const page = await context.newPage();
  page.setDefaultTimeout(15_000);
  await signInInBrowser(page, stack, usernameOf(role));
  return { context, page };
}

const box = async (page: Page, testID: string) => (await visible(page, testID).boundingBox())!;

describe('the live report preview', () => {
  it('at 1440 px stands beside the form and follows each autosave; it can be hidden and shown again', async () => {
    const me = await physicianId();
    const study = await completeStudy('Quillfeather', me);
    const { context, page } = await newPage(viewports.desktop, 'physician');
    try {
      await page.goto(`${stack.url}/studies/${study.id}/findings`);
      await visible(page, 'findings-impression').waitFor();
      await visible(page, 'report-pane-document').waitFor();
      // Side by side: the preview starts right of the form, and both begin near the top of the page.
      const form = await box(page, 'findings-impression');
      const pane = await box(page, 'report-pane');
      expect(pane.x).toBeGreaterThanOrEqual(form.x + form.width);
      expect(pane.y).toBeLessThan(300);
      expect(pane.width).toBeGreaterThan(340);
      expect(form.width).toBeGreaterThan(300);
      await expect.poll(async () => visible(page, 'report-pane-document-impression').innerText(), { timeout: 15_000 }).toContain('Significant LAD lesion.');
      await expect.poll(async () => visible(page, 'report-pane-document-indices').innerText(), { timeout: 15_000 }).toMatch(/0\.80/);
      const versionBefore = await visible(page, 'report-pane-status').innerText();

      // Markup typed by the physician is shown as the characters typed, never run or rendered.
      const typed = 'Reviewed: <b>no</b> <img src=x onerror="window.__ran=1"> stent needed now.';
      await visible(page, 'findings-impression').fill(typed);
      await expect
        .poll(async () => visible(page, 'report-pane-document-impression').innerText(), { timeout: 15_000 })
        .toContain(typed);
      await expect.poll(async () => visible(page, 'report-pane-status').innerText(), { timeout: 15_000 }).not.toBe(versionBefore);
      expect(await page.evaluate(() => (window as unknown as { __ran?: number }).__ran)).toBeUndefined();
      expect(await page.locator('[data-testid="report-pane"] img, [data-testid="report-pane"] b').count()).toBe(0);
      await page.screenshot({ path: screenshotPath('report-preview-beside-form-desktop') });

      // Hidden: the form takes the room and the results column returns; remembered over a reload.
      await visible(page, 'report-pane-hide').click();
      await visible(page, 'report-pane-show').waitFor();
      expect(await visible(page, 'report-pane').count()).toBe(0);
      await page.reload();
      await visible(page, 'findings-impression').waitFor();
      await visible(page, 'report-pane-show').waitFor();
      expect(await visible(page, 'report-pane').count()).toBe(0);
      // The live results have their column beside the form again.
      await visible(page, 'study-results').waitFor();
      const results = await box(page, 'study-results');
      const formAgain = await box(page, 'findings-impression');
      expect(results.x).toBeGreaterThanOrEqual(formAgain.x + formAgain.width);
      await page.screenshot({ path: screenshotPath('report-preview-hidden-desktop') });
      await visible(page, 'report-pane-show').click();
      await visible(page, 'report-pane-document').waitFor();

      // The narrowest screen that keeps both side by side, and just below it none.
      await page.setViewportSize({ width: 1100, height: 800 });
      await visible(page, 'report-pane').waitFor();
      const narrowForm = await box(page, 'findings-impression');
      const narrowPane = await box(page, 'report-pane');
      expect(narrowPane.x).toBeGreaterThanOrEqual(narrowForm.x + narrowForm.width);
      expect(narrowForm.width).toBeGreaterThan(300);
      await page.screenshot({ path: screenshotPath('report-preview-beside-form-1100') });
      await page.setViewportSize({ width: 1060, height: 800 });
      await visible(page, 'findings-impression').waitFor();
      // The layout follows the resize on the next render: wait for it rather than read at once.
      await expect.poll(async () => visible(page, 'report-pane').count(), { timeout: 10_000 }).toBe(0);
    } finally {
      await context.close();
    }
  }, 120_000);

  it('at 390 px there is no side pane; the Report section keeps its preview', async () => {
    const study = await completeStudy('Marchetti', await physicianId());
    const { context, page } = await newPage(viewports.phone, 'physician');
    try {
      await page.goto(`${stack.url}/studies/${study.id}/findings`);
      await visible(page, 'findings-impression').waitFor();
      expect(await visible(page, 'report-pane').count()).toBe(0);
      expect(await visible(page, 'report-pane-show').count()).toBe(0);
      await page.screenshot({ path: screenshotPath('report-preview-findings-phone') });
      await page.goto(`${stack.url}/studies/${study.id}/report`);
      await visible(page, 'report-preview-text').waitFor();
      await expect(visible(page, 'report-preview-text-impression').innerText()).resolves.toContain('Significant LAD lesion.');
      // The preview fits the phone: no element wider than the screen but the tables' own scroll areas.
      const preview = await box(page, 'report-preview-text');
      expect(preview.x + preview.width).toBeLessThanOrEqual(390);
      await visible(page, 'report-preview-text-impression').scrollIntoViewIfNeeded();
      await page.screenshot({ path: screenshotPath('report-preview-section-phone') });
    } finally {
      await context.close();
    }
  }, 120_000);
});

describe('the physician’s landing page', () => {
  it('lists the studies awaiting their signature, oldest first with their age, then all awaiting studies; a row opens the report', async () => {
    const me = await physicianId();
    const [other] = await db.query(`SELECT id FROM app_user WHERE role = 'staff' LIMIT 1`);
    const made: Array<{ study: StudyRecord; hoursAgo: number; mine: boolean }> = [];
    for (const [name, hoursAgo, mine] of [
      ['Aldana', 5, true],
      ['Bexley', 75, true],
      ['Castellan', 30, true],
      ['Dumont', 120, false],
    ] as const) {
      const study = await completeStudy(name, me);
      await send('post', `/api/studies/${study.id}/transitions`, staff).send({ action: 'mark-ready', version: study.version }).expect(200);
      // Back-dated, and (for one) operated by someone else: set directly, as the form would never date a study.
      await db.query(
        `UPDATE study SET procedure_ended_at = now() - make_interval(hours => $2), procedure_started_at = now() - make_interval(hours => $2 + 1), operator_id = $3 WHERE id = $1`,
        [study.id, hoursAgo, mine ? me : other.id],
      );
      made.push({ study, hoursAgo, mine });
    }
    const accessionsIn = async (page: Page, list: string) =>
      page.locator(`[data-testid="${list}"]:visible [data-testid^="study-row-"]`).evaluateAll((rows) => rows.map((r) => r.getAttribute('data-testid')!.replace('study-row-', '')));
    const acc = (name: string) => made.find((m) => m.study.patient.familyName === name)!.study.accession;

    for (const [viewport, label] of [
      [viewports.desktop, 'desktop'],
      [viewports.phone, 'phone'],
    ] as const) {
      const { context, page } = await newPage(viewport, 'physician');
      try {
        await visible(page, 'awaiting-mine').waitFor();
        // The physician sees every row here (at most 5 before "Show all"); the test's rows are the newest made.
        if (await visible(page, 'awaiting-mine-more').count()) await visible(page, 'awaiting-mine-more').click();
        if (await visible(page, 'awaiting-all-more').count()) await visible(page, 'awaiting-all-more').click();
        const mine = (await accessionsIn(page, 'awaiting-mine')).filter((a) => made.some((m) => m.study.accession === a));
        expect(mine).toEqual([acc('Bexley'), acc('Castellan'), acc('Aldana')]);
        const all = (await accessionsIn(page, 'awaiting-all')).filter((a) => made.some((m) => m.study.accession === a));
        expect(all).toEqual([acc('Dumont'), acc('Bexley'), acc('Castellan'), acc('Aldana')]);
        await expect(visible(page, `awaiting-mine-age-${acc('Bexley')}`).innerText()).resolves.toMatch(/3 d 3 h[\s\S]*past 24 h/);
        await expect(visible(page, `awaiting-mine-age-${acc('Aldana')}`).innerText()).resolves.toMatch(/^5 h\s+waiting$/);
        await page.screenshot({ path: screenshotPath(`physician-landing-${label}`), fullPage: label === 'phone' });
        if (label === 'desktop') {
          await page.locator(`[data-testid="awaiting-mine"]:visible [data-testid="study-row-${acc('Bexley')}"]`).click();
          await page.waitForURL(new RegExp(`/studies/${made.find((m) => m.study.patient.familyName === 'Bexley')!.study.id}/report$`));
          await visible(page, 'report-preview-text').waitFor();
        }
      } finally {
        await context.close();
      }
    }
  }, 120_000);
});

describe('caught mail', () => {
  it('an administrator finds the notice a signature sent; the link is in their navigation only', async () => {
    const referrer = `ref-${randomUUID().slice(0, 6)}@clinic.example`;
    const study = await completeStudy('Ferreira', await physicianId(), referrer);
    const physician = (await signIn(stack, usernameOf('physician'))).cookie;
    await send('post', `/api/studies/${study.id}/sign`, physician).send({ version: study.version }).expect(201);

    const { context, page } = await newPage(viewports.desktop, 'admin');
    try {
      await visible(page, 'nav-caught-mail').click();
      await page.waitForURL(/\/caught-mail$/);
      const row = page.locator('[data-testid^="caught-mail-"][data-testid$="-subject"]:visible', { hasText: study.accession });
      await row.first().waitFor({ timeout: 20_000 });
      await expect(row.first().innerText()).resolves.toBe(`Report signed: accession ${study.accession}`);
      await row.first().click();
      const text = page.locator('[data-testid^="caught-mail-"][data-testid$="-text"]:visible');
      await expect(text.first().innerText()).resolves.toContain(`accession number ${study.accession} has been signed`);
      await expect(text.first().innerText()).resolves.not.toContain('Ferreira');
      await page.screenshot({ path: screenshotPath('caught-mail-desktop') });
    } finally {
      await context.close();
    }
    const { context: phys, page: physPage } = await newPage(viewports.desktop, 'physician');
    try {
      await visible(physPage, 'nav-worklist').waitFor();
      expect(await visible(physPage, 'nav-caught-mail').count()).toBe(0);
    } finally {
      await phys.close();
    }
  }, 120_000);
});
