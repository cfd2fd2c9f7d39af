import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { addJob } from '../../server/jobs/queue';
import { startWorker, type WorkerHandle } from '../../server/jobs/worker';
import { openTestDatabase } from '../support/app';

// Jobs are enqueued inside the caller's transaction (graphile-worker's add_job SQL function, its
// documented transactional enqueue): they exist exactly when the change that asked for them commits.
// The worker runs with the server's role.

let db: DataSource;
let worker: WorkerHandle;
const ran: Array<{ marker: string }> = [];

beforeAll(async () => {
  db = await openTestDatabase();
  worker = await startWorker(
    {
      'test-record-marker': async (payload) => {
        ran.push(payload as { marker: string });
      },
    },
    { databaseUrl: process.env.DATABASE_URL!, pollInterval: 100, concurrency: 1 },
  );
});
afterAll(async () => {
  await worker.stop();
  await db.destroy();
});

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

describe('addJob', () => {
  it('runs a job added in a committed transaction, and never one added in a rolled-back transaction', async () => {
    const rolledBack = randomUUID();
    const committed = randomUUID();
    await expect(
      db.transaction(async (tx) => {
        await addJob(tx, 'test-record-marker', { marker: rolledBack });
        throw new Error('the change fails after asking for the job');
      }),
    ).rejects.toThrow('the change fails');
    await db.transaction(async (tx) => {
      await addJob(tx, 'test-record-marker', { marker: committed });
    });

    for (let i = 0; i < 100 && !ran.some((r) => r.marker === committed); i++) await sleep(100);
    expect(ran.map((r) => r.marker)).toContain(committed);
    // The worker has drained the queue (it took the later job); give it one more poll for anything left.
    await sleep(500);
    expect(ran.map((r) => r.marker)).not.toContain(rolledBack);
    const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM graphile_worker._private_jobs WHERE payload->>'marker' = ANY($1)`, [[rolledBack, committed]]);
    expect(n).toBe(0);
  });
});
