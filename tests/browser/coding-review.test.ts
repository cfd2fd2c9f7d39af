import fs from 'node:fs';
import { parse } from 'csv-parse/sync';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import type { DataSource } from 'typeorm';
import type { ReviewView } from '../../shared/coding/review';
import { launchBrowser, screenshotPath, signInInBrowser, viewports, visible } from '../support/browser';
import { openTestDatabase } from '../support/app';
import { signedCodingStudy } from '../support/coding';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

/*
 * The study's suggestions (see tests/support/coding.ts) and their sources:
 * - CPT 93458-26: coronary angiography with left heart catheterization, professional component (CPT 93454–93461; CMS PC/TC indicator) [memory, well known];
 * - CPT 93571-26 / 93572-26: coronary physiology, first vessel / each additional vessel (CPT add-on codes) [memory, well known];
 * - ICD-10-CM I25.119: coronary atherosclerosis of a native artery with unspecified angina (ICD-10-CM tabular, guideline I.C.9.b);
 * - ICD-10-CM I25.10 (without angina) and Z95.5 (presence of a coronary stent): ICD-10-CM tabular [memory].
 */

let db: DataSource;
let stack: TestStack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
let physicianId: string;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
  browser = await launchBrowser();
  await signIn(stack, usernameOf('physician'));
  [{ id: physicianId }] = await db.query(`SELECT id FROM app_user WHERE role = 'physician' ORDER BY created_at LIMIT 1`);
});
afterAll(async () => {
  await browser?.close();
  await stack?.close();
  await db?.destroy();
});

async function openReview(page: Page, accession: string) {
  await page.waitForURL(/\/coding$/);
  await visible(page, `queue-row-${accession}`).click();
  await page.waitForURL(/\/coding\/[0-9a-f-]{36}$/);
  await visible(page, 'review-lines').waitFor();
}

const stored = async (studyId: string): Promise<ReviewView> => {
  const lines = await db.query(
    `SELECT l.code, l.modifiers, l.origin, d.decision, d.code AS d_code, d.modifiers AS d_modifiers, d.reason
     FROM coding_review r JOIN code_line l ON l.set_id = r.current_set_id
     LEFT JOIN LATERAL (SELECT * FROM code_decision WHERE line_id = l.id ORDER BY id DESC LIMIT 1) d ON true
     WHERE r.study_id = $1 ORDER BY l.position`,
    [studyId],
  );
  const [review] = await db.query(`SELECT status, completer_name FROM coding_review WHERE study_id = $1`, [studyId]);
  return { ...review, lines } as unknown as ReviewView;
};

describe("the coder's review", () => {
  it('on a desktop: accepts two codes, edits one, rejects one with a reason, adds one and completes the review', async () => {
    const study = await signedCodingStudy(db, physicianId, 'Desktopcase');
    const context = await browser.context.browser()!.newContext({ viewport: viewports.desktop });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('coder'));
      // The queue shows the age of each study; its row opens the review.
      await expect(visible(page, `queue-age-${study.accession}`).innerText()).resolves.toMatch(/^Waiting /);
      await openReview(page, study.accession);
      // Each code with its reason; the caution and the warning about resting-only physiology.
      await expect(visible(page, 'review-caution').innerText()).resolves.toMatch(/certified coder/i);
      await expect(visible(page, 'code-93458-26-rationale').innerText()).resolves.toMatch(/^Why: .{20,}/);
      await visible(page, 'warning-resting-only-physiology').waitFor();
      // Report beside the codes on a wide screen.
      const codesBox = (await visible(page, 'review-lines').boundingBox())!;
      const reportBox = (await visible(page, 'review-report').boundingBox())!;
      expect(reportBox.x).toBeGreaterThan(codesBox.x + codesBox.width - 1);
      await page.screenshot({ path: screenshotPath('coding-review-desktop') });
      await expect(visible(page, 'review-complete').getAttribute('aria-disabled')).resolves.toBe('true');

      await visible(page, 'code-93458-26-accept').click();
      await expect.poll(() => visible(page, 'code-93458-26-decision').innerText()).toMatch(/Accepted/);
      // Keyboard: focus the next accept button and press Enter.
      await visible(page, 'code-93571-26-accept').focus();
      await page.keyboard.press('Enter');
      await expect.poll(() => visible(page, 'code-93571-26-decision').innerText()).toMatch(/Accepted/);

      await visible(page, 'code-93572-26-reject').click();
      await visible(page, 'code-93572-26-reject-save').click();
      await expect(visible(page, 'code-93572-26-reject-reason-error').innerText()).resolves.toMatch(/Say why/);
      await visible(page, 'code-93572-26-reject-reason').fill('The circumflex had a resting ratio only');
      await visible(page, 'code-93572-26-reject-save').click();
      await expect.poll(() => visible(page, 'code-93572-26-decision').innerText()).toMatch(/Rejected/);

      await visible(page, 'code-I25.119-edit').click();
      await visible(page, 'code-I25.119-edit-code').fill('I2510');
      await visible(page, 'code-I25.119-edit-reason').fill('Angina is not documented in the signed report');
      await visible(page, 'code-I25.119-edit-save').click();
      await expect(visible(page, 'code-I25.119-edit-code-error').innerText()).resolves.toMatch(/ICD-10-CM codes are/);
      await visible(page, 'code-I25.119-edit-code').fill('I25.10');
      await visible(page, 'code-I25.119-edit-save').click();
      await expect.poll(() => visible(page, 'code-I25.119-final').count()).toBe(1);
      await expect(visible(page, 'code-I25.119-final').innerText()).resolves.toMatch(/Reported as ICD-10-CM I25\.10/);

      await visible(page, 'add-code-open').click();
      await visible(page, 'add-code-system-ICD-10-CM').click();
      await visible(page, 'add-code-code').fill('Z95.5');
      await visible(page, 'add-code-reason').fill('Prior coronary stent documented in the history');
      await visible(page, 'add-code-save').click();
      await visible(page, 'code-Z95.5').waitFor();
      await page.screenshot({ path: screenshotPath('coding-review-desktop-decided'), fullPage: true });

      await expect.poll(() => visible(page, 'review-complete').getAttribute('aria-disabled')).not.toBe('true');
      await visible(page, 'review-complete').click();
      await expect.poll(() => visible(page, 'review-status').innerText()).toBe('Coded');

      // What was stored: the suggestions as made, each with the coder's decision.
      const r = await stored(study.id);
      expect(r.status).toBe('coded');
      expect(r.lines).toEqual([
        { code: '93458', modifiers: ['26'], origin: 'suggested', decision: 'accept', d_code: null, d_modifiers: null, reason: null },
        { code: '93571', modifiers: ['26'], origin: 'suggested', decision: 'accept', d_code: null, d_modifiers: null, reason: null },
        { code: '93572', modifiers: ['26'], origin: 'suggested', decision: 'reject', d_code: null, d_modifiers: null, reason: 'The circumflex had a resting ratio only' },
        { code: 'I25.119', modifiers: [], origin: 'suggested', decision: 'edit', d_code: 'I25.10', d_modifiers: [], reason: 'Angina is not documented in the signed report' },
        { code: 'Z95.5', modifiers: [], origin: 'added', decision: 'add', d_code: null, d_modifiers: null, reason: 'Prior coronary stent documented in the history' },
      ]);

      // The export holds exactly these codes as reported.
      const today = new Date().toISOString().slice(0, 10);
      const exported = await page.request.get(`${stack.url}/api/coding/export?from=${today}&to=${today}&format=json`);
      expect(exported.status()).toBe(200);
      const items: { accession: string; system: string; code: string; modifiers: string[]; units: number }[] = (await exported.json()).items;
      expect(items.filter((c) => c.accession === study.accession).map((c) => `${c.system} ${[c.code, ...c.modifiers].join('-')} x${c.units}`)).toEqual([
        'CPT 93458-26 x1',
        'CPT 93571-26 x1',
        'ICD-10-CM I25.10 x1',
        'ICD-10-CM Z95.5 x1',
      ]);

      // The study has left the queue.
      await visible(page, 'review-back').click();
      await page.waitForURL(/\/coding$/);
      await expect.poll(async () => (await visible(page, 'coding-queue').count()) === 0 || (await visible(page, `queue-row-${study.accession}`).count()) === 0).toBe(true);
      await visible(page, 'queue-status-coded').click();
      await visible(page, `queue-row-${study.accession}`).waitFor();

      // The CSV downloaded from the queue's export (today by default) holds exactly these codes too.
      const [download] = await Promise.all([page.waitForEvent('download'), visible(page, 'export-csv').click()]);
      const csv = fs.readFileSync((await download.path())!, 'utf8');
      const rows: Record<string, string>[] = parse(csv, { columns: true });
      expect(rows.filter((c) => c.accession === study.accession).map((c) => `${c.system} ${[c.code, ...c.modifiers.split(' ').filter(Boolean)].join('-')} x${c.units} ${c.decision}`)).toEqual([
        'CPT 93458-26 x1 accept',
        'CPT 93571-26 x1 accept',
        'ICD-10-CM I25.10 x1 edit',
        'ICD-10-CM Z95.5 x1 add',
      ]);
    } finally {
      await context.close();
    }
  });

  it('on a phone: codes above the report, large targets, a code accepted and one edited', async () => {
    const study = await signedCodingStudy(db, physicianId, 'Phonecase');
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('coder'));
      await visible(page, `queue-row-${study.accession}`).waitFor();
      await page.screenshot({ path: screenshotPath('coding-queue-phone') });
      await openReview(page, study.accession);
      const codesBox = (await visible(page, 'review-lines').boundingBox())!;
      const reportBox = (await visible(page, 'review-report').boundingBox())!;
      expect(reportBox.y).toBeGreaterThan(codesBox.y + codesBox.height - 1);
      const accept = visible(page, 'code-93458-26-accept');
      expect((await accept.boundingBox())!.height).toBeGreaterThanOrEqual(44); // touch target, common practice (WCAG 2.5.5 target size)
      expect(await accept.getAttribute('aria-label')).toBe('Accept CPT 93458-26');
      await accept.click();
      await expect.poll(() => visible(page, 'code-93458-26-decision').innerText()).toMatch(/Accepted/);
      await page.screenshot({ path: screenshotPath('coding-review-phone') });
      expect((await stored(study.id)).status).toBe('in-review');

      // Editing on the phone: the form's fields wrap, and its buttons stay inside the code's card.
      const inside = async (child: string, parent: string) => {
        const c = (await visible(page, child).boundingBox())!;
        const p = (await visible(page, parent).boundingBox())!;
        return c.y >= p.y && c.y + c.height <= p.y + p.height && c.x >= p.x && c.x + c.width <= p.x + p.width;
      };
      await visible(page, 'code-I25.119-edit').click();
      await visible(page, 'code-I25.119-edit-code').fill('I25.10');
      await visible(page, 'code-I25.119-edit-reason').fill('Angina is not documented in the signed report');
      await expect.poll(() => inside('code-I25.119-edit-save', 'code-I25.119')).toBe(true);
      await page.screenshot({ path: screenshotPath('coding-review-phone-edit') });
      await visible(page, 'code-I25.119-edit-save').click();
      await expect(visible(page, 'code-I25.119-final').innerText()).resolves.toMatch(/Reported as ICD-10-CM I25\.10/);
      await visible(page, 'add-code-open').click();
      await visible(page, 'add-code-system-HCPCS').click();
      await expect.poll(() => inside('add-code-save', 'add-code')).toBe(true);
      await visible(page, 'add-code-cancel').click();
    } finally {
      await context.close();
    }
  });

  it('lets the chief read a review but not decide', async () => {
    const study = await signedCodingStudy(db, physicianId, 'Chiefcase');
    const context = await browser.context.browser()!.newContext({ viewport: viewports.desktop });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('chief'));
      await page.goto(`${stack.url}/coding/${study.id}`);
      await visible(page, 'code-93458-26').waitFor();
      expect(await visible(page, 'code-93458-26-accept').count()).toBe(0);
      expect(await visible(page, 'review-complete').count()).toBe(0);
    } finally {
      await context.close();
    }
  });

  it("on a phone: lab staff record the coding section of a study, and it is saved", async () => {
    const { createStudy } = await import('../../server/studies/repository');
    const id = await createStudy(db, { patient: { mrn: `CF-${Date.now().toString(36).toUpperCase()}`, familyName: 'Formcase', givenName: 'Ines', birthDate: '1964-07-02', sex: 'female' } }, null);
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('staff'));
      await page.goto(`${stack.url}/studies/${id}/coding`);
      await visible(page, 'card-encounter').waitFor();
      await visible(page, 'coding-patient-class-outpatient').click();
      await visible(page, 'coding-billing-professional').click();
      await visible(page, 'coding-setting-hospital').click();
      await visible(page, 'coding-diagnostic-cath-done').click();
      await visible(page, 'coding-left-heart-true').click();
      // Left ventriculography is asked only once a left heart catheterization is recorded.
      await visible(page, 'coding-left-ventriculography-true').waitFor();
      await visible(page, 'intervention-add').click();
      await visible(page, 'intervention-0-vessel-RCA').click();
      await visible(page, 'intervention-0-stent-drug-eluting').click();
      expect(await visible(page, 'coding-patient-class-outpatient').getAttribute('aria-checked')).toBe('true');
      await visible(page, 'save-status-saved').waitFor({ timeout: 10_000 });
      await page.screenshot({ path: screenshotPath('study-coding-section-phone'), fullPage: true });
      await expect
        .poll(async () => (await db.query(`SELECT coding_patient_class, diagnostic_cath, cath_left_heart FROM study WHERE id = $1`, [id]))[0])
        .toEqual({ coding_patient_class: 'outpatient', diagnostic_cath: 'done', cath_left_heart: true });
      await expect
        .poll(async () => db.query(`SELECT vessel, kind, branch, stent FROM coronary_intervention WHERE study_id = $1`, [id]))
        .toEqual([{ vessel: 'RCA', kind: 'stent', branch: false, stent: 'drug-eluting' }]);
    } finally {
      await context.close();
    }
  });
});
