import { afterAll, afterEach, beforeAll, beforeEach, expect, it } from 'vitest';
import { deliveryJobKey } from '../../server/ehr/enqueue-delivery';
import { bundleIdOf, DeliveryHarness, reportVersionIds, until } from '../support/delivery-harness';
import type { WorkerProcess } from '../support/worker-process';

// Worker processes (tests/support/delivery-worker.ts: graphile-worker with the server's delivery task,
// configured from the environment) killed mid-send and running side by side on one queue. The EHR
// stand-in on loopback; every wait is bounded.

const h = new DeliveryHarness();
beforeAll(() => h.start());
beforeEach(() => h.ehr.setFault('none'));
afterEach(() => h.killWorkers());
afterAll(() => h.stop());

it('a worker killed (SIGKILL) mid-delivery: after a restart each report is delivered once and the EHR keeps one report', async () => {
  const first = await h.spawnWorker({ WORKER_CONCURRENCY: '4' });

  // X: the EHR holds the request open without processing it.
  h.ehr.setFault('hang');
  const [x] = await h.signMany(1);
  await until('the EHR holding the request for X', () => h.ehr.heldRequests().includes(bundleIdOf(x)), 60_000);

  // Y: the EHR stores the transaction but its answer never leaves (the EHR committed, the sender never hears).
  h.ehr.setFault('hold-response');
  const [y] = await h.signMany(1);
  await until('the EHR storing Y without answering', () => h.ehr.heldRequests().includes(bundleIdOf(y)), 60_000);
  expect(h.receivedFor(x)).toEqual([]);
  expect(h.receivedFor(y)).toEqual(['accepted']);
  expect(h.reportsFor(y)).toHaveLength(1);
  expect((await h.deliveries([x, y])).map((d) => d.status)).toEqual(['sending', 'sending']);

  await first.kill('SIGKILL');
  h.ehr.setFault('none');
  // The dead worker's jobs stay locked; graphile-worker frees a lock once it is four hours old, and the
  // delivery's own lease (minutes) has run out by then. Four hours pass: both moved back in time.
  const keys = [x, y].map((s) => deliveryJobKey(s.reportVersionId));
  const locked = await h.db.query(`SELECT locked_at FROM graphile_worker._private_jobs WHERE key = ANY($1::text[])`, [keys]);
  expect(locked.map((j: { locked_at: Date | null }) => j.locked_at !== null)).toEqual([true, true]);
  await h.db.query(`UPDATE graphile_worker._private_jobs SET locked_at = locked_at - interval '4 hours 1 minute' WHERE key = ANY($1::text[])`, [keys]);
  await h.db.query(
    `UPDATE report_delivery SET lease_until = lease_until - interval '4 hours 1 minute', first_attempt_at = first_attempt_at - interval '4 hours 1 minute'
      WHERE report_version_id = ANY($1::uuid[])`,
    [reportVersionIds([x, y])],
  );

  const second = await h.spawnWorker();
  await until('X and Y delivered after the restart', () => h.allDelivered([x, y]), 60_000);
  // X reaches the EHR for the first time; Y is sent again and recognised by its Bundle.identifier
  // (and would be a conditional update by identifier anyway): one DiagnosticReport each.
  expect(h.receivedFor(x)).toEqual(['accepted']);
  expect(h.receivedFor(y)).toEqual(['accepted', 'resend']);
  expect(h.reportsFor(x)).toHaveLength(1);
  expect(h.reportsFor(y)).toHaveLength(1);
  const [dx, dy] = await h.deliveries([x, y]);
  expect(dx).toMatchObject({ status: 'delivered', attempts: 2, ehr_report_id: `DiagnosticReport/${h.reportsFor(x)[0].id}` });
  expect(dy).toMatchObject({ status: 'delivered', attempts: 2, ehr_report_id: `DiagnosticReport/${h.reportsFor(y)[0].id}` });
  expect(second.events.some((e) => e.event === 'finished' && e.id === y.reportVersionId)).toBe(true);
  await second.kill('SIGTERM');
}, 200_000);

it('two worker processes on one queue: a backlog of 20 signed reports, each sent once', async () => {
  const signed = await h.signMany(20);
  const [a, b] = await Promise.all([h.spawnWorker(), h.spawnWorker()]);
  await until('all 20 delivered', () => h.allDelivered(signed), 60_000);

  for (const s of signed) {
    expect(h.receivedFor(s), s.accession).toEqual(['accepted']);
    expect(h.reportsFor(s), s.accession).toHaveLength(1);
  }
  expect((await h.deliveries(signed)).every((d) => d.attempts === 1)).toBe(true);
  // Each job ran in exactly one of the two processes (the queue's row locking), and both took part.
  const ids = reportVersionIds(signed);
  const startedBy = (w: WorkerProcess) => w.events.filter((e) => e.event === 'started' && ids.includes(e.id!)).map((e) => e.id);
  const [byA, byB] = [startedBy(a), startedBy(b)];
  expect([...byA, ...byB].sort()).toEqual([...ids].sort());
  expect(byA.length).toBeGreaterThan(0);
  expect(byB.length).toBeGreaterThan(0);
  await Promise.all([a.kill('SIGTERM'), b.kill('SIGTERM')]);
}, 200_000);
