import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { startFakeSmtp } from '../../server/fakes/smtp';
import { startWorker, type WorkerHandle } from '../../server/jobs/worker';
import { sendReportNoticeTask } from '../../server/mail/send-report-notice';
import { openTestDatabase } from '../support/app';
import { completeStudy } from '../support/reports';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

// A signature never waits on the mail relay: the referrer's notice is a queued job, retried with
// backoff while the relay is down, and sent exactly once when it is back (common practice for
// transactional outboxes; graphile-worker retries a failed job with exponential backoff).

let db: DataSource;
let stack: TestStack;
let smtpPort: number;
const run = randomUUID().slice(0, 8);
const STUDIES = 20;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db);
  // Find a free port for the relay, then leave it closed: the relay is down from the start.
  const probe = await startFakeSmtp({ port: 0, httpPort: 0 });
  smtpPort = probe.port;
  await probe.close();
});
afterAll(async () => {
  await stack.close();
  await db.destroy();
});

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const noticeJobs = async (ids: string[]) =>
  (await db.query(
    `SELECT j.attempts, j.last_error FROM graphile_worker._private_jobs j JOIN graphile_worker._private_tasks t ON t.id = j.task_id
     WHERE t.identifier = 'send-report-notice' AND j.payload->>'reportVersionId' = ANY($1)`,
    [ids],
  )) as Array<{ attempts: number; last_error: string | null }>;

describe('referrer notices while the mail relay is down', () => {
  it('signs 20 reports with the relay stopped, retries, and delivers each notice exactly once when it returns', async () => {
    const staff = (await signIn(stack, usernameOf('staff'))).cookie;
    const physician = (await signIn(stack, usernameOf('physician'))).cookie;
    const referrer = (i: number) => `referrer-${run}-${i}@clinic.example`;

    const signed: Array<{ versionId: string; accession: string; to: string }> = [];
    for (let i = 0; i < STUDIES; i++) {
      const study = await completeStudy(stack.url, staff, { referringEmail: referrer(i) });
      const res = await request(stack.url).post(`/api/studies/${study.id}/sign`).set('Cookie', physician).set('Origin', stack.url).send({ version: study.version });
      expect(res.status).toBe(201); // the signature does not wait on, or fail because of, the relay
      signed.push({ versionId: res.body.id, accession: study.accession, to: referrer(i) });
    }
    const ids = signed.map((s) => s.versionId);
    expect(await noticeJobs(ids)).toHaveLength(STUDIES);

    const mail = { host: '127.0.0.1', port: smtpPort, from: 'reports@saltmarsh.example', hospitalName: 'Saltmarsh General' };
    const work = () => startWorker({ 'send-report-notice': sendReportNoticeTask(db, mail) }, { databaseUrl: process.env.DATABASE_URL!, pollInterval: 200, concurrency: 4 });

    // Relay down: every notice is tried, fails, and waits for its retry.
    let worker: WorkerHandle = await work();
    try {
      for (let i = 0; i < 100; i++) {
        const jobs = await noticeJobs(ids);
        if (jobs.every((j) => j.attempts >= 1 && j.last_error)) break;
        await sleep(200);
      }
    } finally {
      await worker.stop();
    }
    const failed = await noticeJobs(ids);
    expect(failed).toHaveLength(STUDIES);
    for (const j of failed) {
      expect(j.attempts).toBeGreaterThanOrEqual(1);
      expect(j.last_error).toMatch(/ECONNREFUSED|connect/i);
    }

    // Relay back: run the worker until the notices are all sent (bounded: backoff after one or two
    // failures is a few seconds).
    const smtp = await startFakeSmtp({ port: smtpPort, httpPort: 0 });
    worker = await work();
    try {
      for (let i = 0; i < 300 && (await noticeJobs(ids)).length > 0; i++) await sleep(200);
      expect(await noticeJobs(ids)).toHaveLength(0);
      await sleep(1000); // one more round of polls: nothing is sent twice
    } finally {
      await worker.stop();
      await smtp.close();
    }

    const ours = smtp.caught.filter((m) => m.to.some((to) => to.startsWith(`referrer-${run}-`)));
    expect(ours).toHaveLength(STUDIES);
    for (const s of signed) {
      const toThem = ours.filter((m) => m.to.includes(s.to));
      expect(toThem).toHaveLength(1);
      expect(toThem[0].raw).toContain(`accession ${s.accession}`);
    }
  }, 120_000);
});
