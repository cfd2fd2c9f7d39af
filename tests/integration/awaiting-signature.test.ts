import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import type { AwaitingSignature } from '../../shared/study/awaiting-signature';
import { openTestDatabase } from '../support/app';
import { createStudy } from '../support/factories';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

// The physician's landing lists: studies awaiting signature, oldest first, with how long each has
// waited since the procedure ended (the turnaround clock; a 24 h signature target is common practice).

let db: DataSource;
let stack: TestStack;
let physician: { cookie: string; id: string };
let staff: { cookie: string; id: string };

async function person(role: string) {
  const { cookie } = await signIn(stack, usernameOf(role));
  const me = await request(stack.url).get('/api/me').set('Cookie', cookie).expect(200);
  return { cookie, id: me.body.id as string };
}

async function awaitingStudy(operatorId: string, endedHoursAgo: number, state = 'awaiting-signature') {
  const s = await createStudy(db, { state: 'draft', endedHoursAgo });
  await db.query(`UPDATE study SET operator_id = $2, state = $3 WHERE id = $1`, [s.id, operatorId, state]);
  return s;
}

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
  physician = await person('physician');
  staff = await person('staff');
});
afterAll(async () => {
  await stack.close();
  await db.destroy();
});

describe('GET /api/awaiting-signature', () => {
  it('lists the studies the physician operated, oldest first, with their age, and all awaiting studies', async () => {
    const mineNew = await awaitingStudy(physician.id, 2);
    const mineOld = await awaitingStudy(physician.id, 50);
    const mineMid = await awaitingStudy(physician.id, 10);
    const othersOld = await awaitingStudy(staff.id, 80);
    const mineDraft = await awaitingStudy(physician.id, 100, 'draft');

    const res = await request(stack.url).get('/api/awaiting-signature').set('Cookie', physician.cookie).expect(200);
    const body = res.body as AwaitingSignature;
    const mine = body.mine.items.map((s) => s.id);
    expect(mine.filter((id) => [mineNew.id, mineOld.id, mineMid.id].includes(id))).toEqual([mineOld.id, mineMid.id, mineNew.id]);
    expect(mine).not.toContain(othersOld.id);
    expect(mine).not.toContain(mineDraft.id);
    expect(body.mine.items.every((s) => s.state === 'awaiting-signature' && s.operatorName)).toBe(true);

    const all = body.all.items.map((s) => s.id);
    expect(all.filter((id) => [mineNew.id, mineOld.id, mineMid.id, othersOld.id].includes(id))).toEqual([othersOld.id, mineOld.id, mineMid.id, mineNew.id]);
    expect(all).not.toContain(mineDraft.id);
    // Oldest first throughout, and the age follows the procedure's end.
    const since = body.all.items.map((s) => Date.parse(s.waitingSince));
    expect(since).toEqual([...since].sort((a, b) => a - b));
    const old = body.all.items.find((s) => s.id === mineOld.id)!;
    expect(old.hoursWaiting).toBeGreaterThan(49.9);
    expect(old.hoursWaiting).toBeLessThan(50.5);
    expect(old.overdue).toBe(true);
    expect(body.mine.items.find((s) => s.id === mineNew.id)!.overdue).toBe(false);
    expect(body.all.total).toBeGreaterThanOrEqual(4);
    expect(body.mine.total).toBe(body.mine.items.length);
  });

  it('shows each study field for field as the worklist does, procedure times present or missing', async () => {
    const timed = await awaitingStudy(physician.id, 3);
    const untimed = await awaitingStudy(physician.id, 4);
    await db.query(`UPDATE study SET procedure_ended_at = NULL WHERE id = $1`, [untimed.id]);
    const lists = (await request(stack.url).get('/api/awaiting-signature').set('Cookie', physician.cookie).expect(200)).body as AwaitingSignature;
    const page = await request(stack.url).get('/api/studies').query({ state: 'awaiting-signature', limit: 100 }).set('Cookie', physician.cookie).expect(200);
    for (const id of [timed.id, untimed.id]) {
      const shown = page.body.items.find((x: { id: string }) => x.id === id);
      expect(Object.keys(shown ?? {}).length).toBeGreaterThan(5);
      expect(lists.mine.items.find((x) => x.id === id)).toMatchObject(shown);
      expect(lists.all.items.find((x) => x.id === id)).toMatchObject(shown);
    }
    expect(page.body.items.find((x: { id: string }) => x.id === untimed.id).procedureEndedAt).toBeNull();
  });

  it('a study without a recorded procedure end waits from when its record was opened', async () => {
    const s = await awaitingStudy(physician.id, 1);
    await db.query(`UPDATE study SET procedure_ended_at = NULL, procedure_started_at = NULL WHERE id = $1`, [s.id]);
    const res = await request(stack.url).get('/api/awaiting-signature').set('Cookie', physician.cookie).expect(200);
    const row = (res.body as AwaitingSignature).mine.items.find((x) => x.id === s.id)!;
    expect(row.waitingSince).toBe(row.sortAt);
    expect(row.hoursWaiting).toBeLessThan(0.1);
  });

  it('lab staff read the lists too (theirs: studies they are the operator of); an administrator (no study access) may not; each read is audited', async () => {
    const res = await request(stack.url).get('/api/awaiting-signature').set('Cookie', staff.cookie).expect(200);
    const body = res.body as AwaitingSignature;
    expect(body.all.total).toBeGreaterThan(0);
    expect(body.mine.items.length).toBeGreaterThan(0);
    expect(body.mine.items.every((s) => body.all.items.some((a) => a.id === s.id))).toBe(true);
    const [staffName] = await db.query(`SELECT display_name FROM app_user WHERE id = $1`, [staff.id]);
    expect(body.mine.items.every((s) => s.operatorName === staffName.display_name)).toBe(true);
    for (const role of ['admin']) {
      const { cookie } = await signIn(stack, usernameOf(role));
      const res = await request(stack.url).get('/api/awaiting-signature').set('Cookie', cookie);
      expect(res.status).toBe(403);
      expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    }
    const [row] = await db.query(`SELECT detail FROM audit_event WHERE action = 'search' AND detail->>'view' = 'awaiting-my-signature' ORDER BY id DESC LIMIT 1`);
    expect(row.detail.returned).toBeGreaterThan(0);
  });
});
