import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { openTestDatabase } from '../support/app';
import { completeStudy } from '../support/reports';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

// Access to a patient's record is logged (HIPAA Security Rule, 45 CFR 164.312(b), audit controls);
// logging a view refreshed after each autosave once per window is the product's design (common practice).
let db: DataSource;
let stack: TestStack;
let brief: TestStack;
let staff: string;
let physician: string;
let briefStaff: string;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db); // the default window, 600 s
  brief = await startStack(db, { auditPreviewReadSeconds: 1 });
  staff = (await signIn(stack, usernameOf('staff'))).cookie;
  physician = (await signIn(stack, usernameOf('physician'))).cookie;
  briefStaff = (await signIn(brief, usernameOf('staff'))).cookie;
});
afterAll(async () => {
  await stack.close();
  await brief.close();
  await db.destroy();
});

interface ReadRow {
  actor_name: string;
  detail: { view: string; studyVersion: number };
}
const previewReads = async (studyId: string): Promise<ReadRow[]> =>
  db.query(`SELECT actor_name, detail FROM audit_event WHERE study_id = $1 AND action = 'read' AND detail->>'view' = 'report' ORDER BY id`, [studyId]);

describe('the live report preview in the audit trail', () => {
  it('records the first preview read per user and study within the window, whatever autosaves happen meanwhile, and each other user at once', async () => {
    const study = await completeStudy(stack.url, staff);
    const preview = () => request(stack.url).get(`/api/studies/${study.id}/report`).set('Cookie', staff).expect(200);
    const first = await preview();
    expect(first.body.studyVersion).toBe(study.version);
    // Autosaves move the version; the preview follows each one.
    let version = study.version;
    for (const plan of ['Stent the LAD.', 'Stent the LAD; recheck in 6 weeks.']) {
      const saved = await request(stack.url).patch(`/api/studies/${study.id}`).set('Cookie', staff).set('Origin', stack.url).send({ version, findings: { ...study.findings, plan } }).expect(200);
      version = saved.body.version;
      expect((await preview()).body.studyVersion).toBe(version);
    }
    await preview();
    const staffName = (await db.query(`SELECT actor_name FROM audit_event WHERE entity_id = $1 AND action = 'create'`, [study.id]))[0].actor_name;
    expect(await previewReads(study.id)).toEqual([{ actor_name: staffName, detail: { view: 'report', studyVersion: study.version } }]);

    // Another user's first look is recorded at once, and once.
    await request(stack.url).get(`/api/studies/${study.id}/report`).set('Cookie', physician).expect(200);
    await request(stack.url).get(`/api/studies/${study.id}/report`).set('Cookie', physician).expect(200);
    const reads = await previewReads(study.id);
    expect(reads).toHaveLength(2);
    expect(reads[1].actor_name).not.toBe(staffName);
    expect(reads[1].detail).toEqual({ view: 'report', studyVersion: version });
  });

  it('records the same user again once the window has passed, and keeps studies apart', async () => {
    const one = await completeStudy(brief.url, briefStaff);
    const two = await completeStudy(brief.url, briefStaff);
    const preview = (id: string) => request(brief.url).get(`/api/studies/${id}/report`).set('Cookie', briefStaff).expect(200);
    await preview(one.id);
    await preview(two.id);
    await preview(one.id);
    expect(await previewReads(one.id)).toHaveLength(1);
    expect(await previewReads(two.id)).toHaveLength(1);
    await new Promise((resolve) => setTimeout(resolve, 1200));
    await preview(one.id);
    expect(await previewReads(one.id)).toHaveLength(2);
    expect(await previewReads(two.id)).toHaveLength(1);
  });
});
