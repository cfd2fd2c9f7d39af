import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { emptyFindings, emptyVessel, type StudyRecord } from '../../shared/study/schema';
import { launchBrowser, screenshotPath, signInInBrowser, viewports, visible } from '../support/browser';
import { openTestDatabase } from '../support/app';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

// The hand-off and signature are the product's own workflow (common practice: a report is signed once,
// then changed only by addendum). FFR 72/90 = 0.80 is abnormal (≤ 0.80 — ESC 2024).
let db: DataSource;
let stack: TestStack;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
let staff: string;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
  browser = await launchBrowser();
  staff = (await signIn(stack, usernameOf('staff'))).cookie;
});
afterAll(async () => {
  await browser?.close();
  await stack?.close();
  await db?.destroy();
});

async function newStudy(complete: boolean, impression = 'Significant LAD lesion.'): Promise<StudyRecord> {
  const api = () => request(stack.url);
  const created = await api()
    .post('/api/studies')
    .set('Cookie', staff)
    .set('Origin', stack.url)
    .send({ patient: { mrn: `R-${randomUUID().slice(0, 8)}`, familyName: 'Quillfeather', givenName: 'Noor', birthDate: '1963-03-03', sex: 'female' } })
    .expect(201);
  if (!complete) return created.body;
  const operators = await api().get('/api/operators').set('Cookie', staff).expect(200);
  const res = await api()
    .patch(`/api/studies/${created.body.id}`)
    .set('Cookie', staff)
    .set('Origin', stack.url)
    .send({
      version: created.body.version,
      details: { ...created.body.details, indication: 'Intermediate LAD lesion', clinicalQuestion: 'intermediate-lesion', operatorId: operators.body.items[0].id },
      vessels: [{ ...emptyVessel(randomUUID(), 'LAD'), restPa: 100, restPd: 95, hyperemiaPa: 90, hyperemiaPd: 72, driftPdPa: 1.0, decision: 'pci' }],
      findings: { ...emptyFindings(), complicationKinds: ['none'], impression, plan: 'Stent.' },
    })
    .expect(200);
  return res.body;
}

describe('the report and signature screen', () => {
  it('lists every missing item and keeps signing disabled until the study is complete', async () => {
    const study = await newStudy(false);
    const context = await browser.context.browser()!.newContext({ viewport: viewports.phone });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('physician'));
      await page.goto(`${stack.url}/studies/${study.id}/report`);
      await visible(page, 'report-missing').waitFor();
      await visible(page, 'report-missing-indication').waitFor();
      expect(await visible(page, 'report-action-sign').getAttribute('aria-disabled')).toBe('true');
      await page.screenshot({ path: screenshotPath('report-incomplete-phone') });
    } finally {
      await context.close();
    }
  });

  it('cautions, without refusing, when the impression gives an FFR the study did not measure', async () => {
    const study = await newStudy(true, 'Significant LAD lesion, FFR 0.86.');
    for (const [name, viewport] of [['phone', viewports.phone], ['desktop', viewports.desktop]] as const) {
      const context = await browser.context.browser()!.newContext({ viewport });
      const page = await context.newPage();
      try {
        await signInInBrowser(page, stack, usernameOf('physician'));
        await page.goto(`${stack.url}/studies/${study.id}/report`);
        await visible(page, 'report-written-values').waitFor();
        await expect(visible(page, 'report-written-value-0').innerText()).resolves.toContain('“FFR 0.86”, but this study measured FFR LAD 0.80');
        expect(await visible(page, 'report-action-sign').getAttribute('aria-disabled')).not.toBe('true');
        await page.screenshot({ path: screenshotPath(`report-written-values-${name}`) });
      } finally {
        await context.close();
      }
    }
  });

  it('signs a complete study: the state becomes Signed and version 1 is listed with its PDF', async () => {
    const study = await newStudy(true);
    const context = await browser.context.browser()!.newContext({ viewport: viewports.desktop });
    const page = await context.newPage();
    try {
      await signInInBrowser(page, stack, usernameOf('physician'));
      await page.goto(`${stack.url}/studies/${study.id}/report`);
      await visible(page, 'report-complete').waitFor();
      await expect(visible(page, 'report-preview-text').innerText()).resolves.toContain('FFR 0.80');
      await visible(page, 'report-action-sign').click();
      await visible(page, 'report-version-1').waitFor({ timeout: 20_000 });
      await expect(visible(page, 'report-state').innerText()).resolves.toBe('State: Signed');
      await page.screenshot({ path: screenshotPath('report-signed-desktop') });
      const [row] = await db.query(`SELECT count(*)::int AS n FROM report_version WHERE study_id = $1`, [study.id]);
      expect(row.n).toBe(1);
      // The delivery of the signed version to the EHR is shown on the study's page (queued with the signature).
      await visible(page, 'delivery-panel').waitFor({ timeout: 20_000 });
      await visible(page, 'delivery-v1').waitFor({ timeout: 20_000 });
    } finally {
      await context.close();
    }
  });
});
