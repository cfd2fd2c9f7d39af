import { randomUUID } from 'node:crypto';
import { createServer } from 'node:net';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { emptyFindings, emptyVessel, type StudyRecord } from '../../shared/study/schema';
import { startFakeSmtp } from '../../server/fakes/smtp';
import { startWorker, type WorkerHandle } from '../../server/jobs/worker';
import { sendReportNoticeTask } from '../../server/mail/send-report-notice';
import type { CaughtMessage } from '../../server/mail/queries/caught-mail';
import { openTestDatabase } from '../support/app';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

// The admin's development page lists what the local mail stand-in caught. The referrer's notice names
// the accession only: no diagnosis, measurements or patient name (data minimisation — common practice).

let db: DataSource;
let smtp: Awaited<ReturnType<typeof startFakeSmtp>>;
let stack: TestStack;
let worker: WorkerHandle;
let admin: string;

beforeAll(async () => {
  db = await openTestDatabase();
  smtp = await startFakeSmtp({ port: 0, httpPort: 0 });
  stack = await startStack(db);
  stack.config.mail = { ...stack.config.mail, caughtMailUrl: smtp.listUrl };
  worker = await startWorker(
    { 'send-report-notice': sendReportNoticeTask(db, { host: '127.0.0.1', port: smtp.port, from: stack.config.mail.from, hospitalName: stack.config.hospital.name }) },
    { databaseUrl: process.env.DATABASE_URL!, pollInterval: 100, concurrency: 1 },
  );
  admin = (await signIn(stack, usernameOf('admin'))).cookie;
});
afterAll(async () => {
  await worker?.stop();
  await stack?.close();
  await smtp?.close();
  await db?.destroy();
});

const api = () => request(stack.url);
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

async function caught(cookie = admin): Promise<CaughtMessage[]> {
  const res = await api().get('/api/dev/caught-mail').set('Cookie', cookie).expect(200);
  return res.body.items;
}

describe('GET /api/dev/caught-mail', () => {
  it('is for administrators only', async () => {
    await api().get('/api/dev/caught-mail').expect(401);
    for (const role of ['staff', 'physician', 'coder', 'chief', null]) {
      const { cookie } = await signIn(stack, usernameOf(role));
      const res = await api().get('/api/dev/caught-mail').set('Cookie', cookie);
      expect(res.status, String(role)).toBe(403);
      expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    }
    await caught();
  });

  it('lists the referrer’s notice once a physician signs: the accession, and nothing clinical', async () => {
    const staff = (await signIn(stack, usernameOf('staff'))).cookie;
    const physician = (await signIn(stack, usernameOf('physician'))).cookie;
    const send = (method: 'post' | 'patch', path: string, cookie: string) => api()[method](path).set('Cookie', cookie).set('Origin', stack.url);
    const created = await send('post', '/api/studies', staff)
      .send({ patient: { mrn: `M-${randomUUID().slice(0, 8)}`, familyName: 'Brightwater', givenName: 'Ilse', birthDate: '1958-06-14', sex: 'female' } })
      .expect(201);
    const study: StudyRecord = created.body;
    const operators = await api().get('/api/operators').set('Cookie', staff).expect(200);
    const email = `referrer-${randomUUID().slice(0, 6)}@clinic.example`;
    const complete = await send('patch', `/api/studies/${study.id}`, staff)
      .send({
        version: study.version,
        details: { ...study.details, indication: 'Intermediate LAD lesion', clinicalQuestion: 'intermediate-lesion', operatorId: operators.body.items[0].id, referringName: 'Dr. Referrer', referringEmail: email },
        // FFR 72/90 = 0.80: abnormal (≤ 0.80 — ESC 2024 chronic coronary syndromes guideline).
        vessels: [{ ...emptyVessel(randomUUID(), 'LAD'), restPa: 100, restPd: 95, hyperemiaPa: 90, hyperemiaPd: 72, driftPdPa: 1.0, decision: 'pci' }],
        findings: { ...emptyFindings(), complicationKinds: ['none'], impression: 'Significant LAD lesion.', plan: 'Stent.' },
      })
      .expect(200);
    await send('post', `/api/studies/${study.id}/sign`, physician).send({ version: complete.body.version }).expect(201);

    let mine: CaughtMessage | undefined;
    for (let i = 0; i < 100 && !mine; i++) {
      mine = (await caught()).find((m) => m.to.includes(email));
      if (!mine) await sleep(100);
    }
    expect(mine, 'the notice reached the mail stand-in').toBeTruthy();
    expect(mine!.subject).toBe(`Report signed: accession ${study.accession}`);
    expect(mine!.text).toContain(`accession number ${study.accession} has been signed`);
    for (const clinical of ['Brightwater', 'Ilse', '0.80', 'LAD', 'Stent', 'FFR', '/api/']) expect(mine!.text).not.toContain(clinical);
    expect(mine!.headers.find((h) => h.name === 'X-Isobar-Report-Version')?.value).toBe('1');
    const [row] = await db.query(`SELECT detail FROM audit_event WHERE action = 'search' AND entity_type = 'mail' ORDER BY id DESC LIMIT 1`);
    expect(row.detail.view).toBe('caught-mail');
  });

  it('is not found where the mail stand-in is not in use, or not running', async () => {
    stack.config.mail = { ...stack.config.mail, caughtMailUrl: null };
    const off = await api().get('/api/dev/caught-mail').set('Cookie', admin).expect(404);
    expect(off.headers['content-type']).toMatch(/^application\/problem\+json/);
    expect(off.body.detail).toMatch(/only where the local mail stand-in is in use/);

    // A port nothing listens on: the stand-in configured but not started.
    const probe = createServer();
    await new Promise<void>((r) => probe.listen(0, '127.0.0.1', r));
    const freePort = (probe.address() as { port: number }).port;
    await new Promise<void>((r) => probe.close(() => r()));
    stack.config.mail = { ...stack.config.mail, caughtMailUrl: `http://127.0.0.1:${freePort}/messages` };
    const down = await api().get('/api/dev/caught-mail').set('Cookie', admin).expect(404);
    expect(down.body.detail).toMatch(/not running/);
  });
});
