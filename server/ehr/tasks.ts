import type { Task, TaskList } from 'graphile-worker';
import type { DataSource } from 'typeorm';
import { z } from 'zod';
import type { Config } from '../config';
import { deliverReport, type DeliverDeps } from './deliver-report';
import { EhrClient } from './ehr-client';
import { defaultsFrom, labSettings, type ConfiguredDefaults } from '../settings/queries/lab-settings';

/**
 * The job queue's tasks for EHR delivery. `deliver-report` (payload `{ reportVersionId }`) sends one
 * signed report version; a transient failure throws, so graphile-worker retries with its exponential
 * backoff; a rejection or the time limit ends the job without an error (the delivery row says why).
 * The task reads and writes through the app's DataSource, each statement committing on its own (no
 * transaction: the claim must be committed before the send, and a failure's record must outlive the
 * error thrown for the retry); graphile-worker marks the job done or failed on its own connection.
 */

const payloadSchema = z.object({ reportVersionId: z.uuid() });

export interface DeliveryTaskOptions {
  /** Sends to the EHR at `fhirBaseUrl` when the lab has set one, else to the configured endpoint. */
  send: (bundle: Parameters<DeliverDeps['send']>[0], fhirBaseUrl?: string) => ReturnType<DeliverDeps['send']>;
  limitMs: number;
  leaseMs: number;
  identifierSystems: DeliverDeps['identifierSystems'];
  /** Where the lab has stored no EHR endpoint: the configured one. */
  settingsDefaults: Pick<ConfiguredDefaults, 'ehrBaseUrl'>;
}

export function createDeliveryTasks(dataSource: DataSource, options: DeliveryTaskOptions): TaskList {
  const deliver: Task = async (payload, helpers) => {
    const parsed = payloadSchema.safeParse(payload);
    if (!parsed.success) {
      // A malformed job would fail the same way forever: log it and let it go.
      helpers.logger.error(`deliver-report: payload without a report version id (job ${helpers.job.id})`);
      return;
    }
    const { reportVersionId } = parsed.data;
    // The lab's EHR endpoint, read at each try: a change applies to the next delivery and retry.
    const { ehrBaseUrl: fhirBaseUrl } = await labSettings(dataSource.manager, options.settingsDefaults);
    const outcome = await deliverReport(
      { ...options, send: (bundle) => options.send(bundle, fhirBaseUrl), db: dataSource.manager },
      reportVersionId,
      { attempts: helpers.job.attempts, maxAttempts: helpers.job.max_attempts },
    );
    helpers.logger.info(`deliver-report ${reportVersionId}: ${outcome.result}`);
  };
  return { 'deliver-report': deliver };
}

/**
 * The task options from the server's settings: one EHR client per endpoint (the configured one, or
 * the lab's setting), each reusing its token until it expires (a token is asked for one endpoint).
 */
export function deliveryTaskOptions(config: Config): DeliveryTaskOptions {
  const clients = new Map<string, EhrClient>();
  const clientFor = (fhirBaseUrl: string) => {
    let client = clients.get(fhirBaseUrl);
    if (!client) {
      client = new EhrClient({
        fhirBaseUrl,
        issuer: config.oidc.issuer,
        clientId: config.ehr.clientId,
        clientSecret: config.ehr.clientSecret,
        scope: config.ehr.scope,
        timeoutMs: config.ehr.timeoutMs,
      });
      clients.set(fhirBaseUrl, client);
    }
    return client;
  };
  return {
    send: (bundle, fhirBaseUrl) => clientFor((fhirBaseUrl ?? config.ehr.fhirBaseUrl).replace(/\/$/, '')).sendTransaction(bundle),
    limitMs: config.ehr.deliveryLimitMs,
    // A send is at most two token requests and two transactions, each bounded by the timeout.
    leaseMs: 4 * config.ehr.timeoutMs + 60_000,
    identifierSystems: config.ehr.identifierSystems,
    settingsDefaults: defaultsFrom(config),
  };
}

/** The delivery tasks with the server's settings. */
export function deliveryTasks(dataSource: DataSource, config: Config): TaskList {
  return createDeliveryTasks(dataSource, deliveryTaskOptions(config));
}
