import { afterAll, beforeAll, expect, it } from 'vitest';
import { EhrClient } from '../../server/ehr/ehr-client';
import { deliveryJobKey } from '../../server/ehr/enqueue-delivery';
import { createDeliveryTasks } from '../../server/ehr/tasks';
import { defaultsFrom } from '../../server/settings/queries/lab-settings';
import { EHR_WRITE_SCOPES } from '../../server/fakes/ehr';
import { startWorker } from '../../server/jobs/worker';
import { createLogger } from '../../server/log';
import { testConfig } from '../support/app';
import { bundleIdOf, DeliveryHarness, reportVersionIds, until } from '../support/delivery-harness';

// The EHR is down (nothing listens at its address) while reports are signed, then comes back: the job
// queue's retries deliver every report exactly once. The server's delivery task on the real queue,
// the EHR stand-in on loopback; every wait is bounded.

const h = new DeliveryHarness();
beforeAll(() => h.start());
afterAll(() => h.stop());

it('50 reports signed while the EHR is down; once it is back, each is received exactly once', async () => {
  const config = testConfig();
  const client = new EhrClient({ fhirBaseUrl: h.fhirBaseUrl, issuer: h.idp.issuer, clientId: 'isobar-ehr', clientSecret: h.secret, scope: EHR_WRITE_SCOPES.join(' '), timeoutMs: 5000 });
  const tasks = createDeliveryTasks(h.db, { send: (b) => client.sendTransaction(b), limitMs: config.ehr.deliveryLimitMs, leaseMs: 60_000, identifierSystems: config.ehr.identifierSystems, settingsDefaults: defaultsFrom(config) });
  const worker = await startWorker(tasks, { databaseUrl: config.databaseUrl, logger: createLogger('silent'), concurrency: 4, pollInterval: 100 });
  try {
    await h.ehr.close();
    const signed = await h.signMany(50);

    // Every delivery has been tried and failed (connection refused), and waits for its retry.
    await until('a failed first try of all 50', async () => (await h.deliveries(signed)).every((d) => d.attempts >= 1 && d.status === 'failed-retrying'));
    expect(await h.allDelivered(signed.slice(0, 1))).toBe(false);

    await h.startEhr();
    // Rather than wait out the queue's backoff (e^attempts seconds), the waiting retries are made due now.
    await h.db.query(`UPDATE graphile_worker._private_jobs SET run_at = now() WHERE key = ANY($1::text[])`, [reportVersionIds(signed).map(deliveryJobKey)]);
    await until('all 50 delivered', () => h.allDelivered(signed), 40_000);

    for (const s of signed) {
      expect(h.receivedFor(s), s.accession).toEqual(['accepted']);
      expect(h.reportsFor(s), s.accession).toHaveLength(1);
    }
    expect(h.ehr.received.filter((r) => signed.some((s) => r.identifier === bundleIdOf(s)))).toHaveLength(50);
    const reports = new Set((await h.deliveries(signed)).map((d) => d.ehr_report_id));
    expect(reports.size).toBe(50);
  } finally {
    await worker.stop();
  }
}, 60_000);
