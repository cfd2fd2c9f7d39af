import type { Bundle, OperationOutcome } from 'fhir/r4';
import type { DeliveryIssue, DeliveryStatus, EhrResourceId } from '../../shared/delivery/status';
import type { SendResult } from './ehr-client';
import { BundleBuildError, bundleIdentifierOf } from './build-report-bundle';
import type { EntityManager } from 'typeorm';
import { ReportDelivery } from '../db/entities/report-delivery.entity';
import { ensureDeliveryRow } from './enqueue-delivery';
import { bundleOfLoaded, loadReportVersion } from './queries/report-version';

/**
 * One try at delivering one signed report version to the EHR, and its record in `report_delivery`.
 *
 * - A sender first claims the delivery (status `sending` with a lease), so no two processes send the
 *   same bundle at once; a sender that dies mid-send leaves a lease that expires, and the next try sends
 *   again — the EHR recognises the resend by Bundle.identifier.
 * - Delivered: the EHR's ids are kept. Rejected (a 4xx, or a bundle that cannot be built): kept with
 *   the EHR's issues and not tried again until someone asks for a resend. Transient (5xx, timeout,
 *   connection): `failed-retrying`, and `TransientDeliveryError` is thrown so the job queue tries again
 *   with its backoff — until the time limit after the first try, then `given-up`.
 * - A delivered, rejected or given-up delivery is left alone: a second job for it does nothing.
 */

export interface DeliverDeps {
  /** Outside any transaction: each statement commits on its own (the claim must be seen before the send). */
  db: EntityManager;
  send: (bundle: Bundle) => Promise<SendResult>;
  /** Transient failures are retried until this long after the first try. */
  limitMs: number;
  /** How long a claim holds before another sender may take over (longer than a send can last). */
  leaseMs: number;
  identifierSystems: { patient: string; encounter: string; accession: string };
}

/** Where the job queue is with this job: its attempts so far (this one included) and its limit. */
export interface JobAttempt {
  attempts: number;
  maxAttempts: number;
}

export type DeliverOutcome =
  | { result: 'delivered'; ehrReportId: string | null }
  | { result: 'rejected' | 'given-up'; error: string }
  | { result: 'left-alone'; status: DeliveryStatus }
  | { result: 'no-such-version' };

/** Thrown for a failure worth trying again; the job queue retries the job with backoff. */
export class TransientDeliveryError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'TransientDeliveryError';
  }
}

/** graphile-worker's retry delay after the n-th failed attempt: exp(min(n, 10)) seconds. */
const retryDelayMs = (attempts: number) => Math.round(Math.exp(Math.min(Math.max(attempts, 1), 10)) * 1000);

const MAX_DIAGNOSTICS = 500;

/** The OperationOutcome's issues as stored: severity, code, FHIRPath locations, diagnostics (shortened). */
function issuesOf(outcome: OperationOutcome | undefined): DeliveryIssue[] {
  return (outcome?.issue ?? []).slice(0, 50).map((i) => ({
    severity: i.severity,
    code: i.code,
    ...(i.expression?.length ? { expression: i.expression.slice(0, 10) } : {}),
    ...(i.diagnostics ? { diagnostics: i.diagnostics.slice(0, MAX_DIAGNOSTICS) } : {}),
  }));
}

/** The resources the EHR answered with, from each entry's `response.location` (FHIR R4 Bundle.entry.response). */
function ehrIdsOf(response: Bundle): EhrResourceId[] {
  const ids: EhrResourceId[] = [];
  for (const entry of response.entry ?? []) {
    const location = entry.response?.location;
    if (!location) continue;
    // "Type/id" or "Type/id/_history/version", possibly absolute.
    const match = /(?:^|\/)([A-Z][A-Za-z]+)\/([A-Za-z0-9\-.]{1,64})(?:\/_history\/([A-Za-z0-9\-.]{1,64}))?$/.exec(location);
    if (match) ids.push({ resourceType: match[1], id: match[2], ...(match[3] ? { version: match[3] } : {}) });
  }
  return ids;
}

export async function deliverReport(deps: DeliverDeps, reportVersionId: string, job: JobAttempt): Promise<DeliverOutcome> {
  const { db } = deps;
  if (!(await ensureDeliveryRow(db, reportVersionId))) return { result: 'no-such-version' };

  const claim = await db
    .createQueryBuilder()
    .update(ReportDelivery)
    .set({
      status: 'sending',
      attempts: () => 'attempts + 1',
      firstAttemptAt: () => 'coalesce(first_attempt_at, now())',
      lastAttemptAt: () => 'now()',
      nextAttemptAt: null,
      leaseUntil: () => `now() + :leaseMs * interval '1 millisecond'`,
      updatedAt: () => 'now()',
    })
    .where({ reportVersionId })
    .andWhere(`(status IN ('queued', 'failed-retrying') OR (status = 'sending' AND lease_until < now()))`)
    .setParameter('leaseMs', deps.leaseMs)
    .returning('first_attempt_at')
    .execute();
  const claimed = claim.raw as { first_attempt_at: Date }[];
  if (claimed.length === 0) {
    const current = await db.findOne(ReportDelivery, { select: { id: true, status: true }, where: { reportVersionId } });
    const status = current!.status;
    if (status === 'sending') throw new TransientDeliveryError('Another sender is delivering this report now.');
    return { result: 'left-alone', status };
  }
  const firstAttemptAt = claimed[0].first_attempt_at;

  const loaded = await loadReportVersion(db, reportVersionId);
  if (!loaded) return { result: 'no-such-version' };
  const { version } = loaded;

  let bundle: Bundle;
  try {
    bundle = bundleOfLoaded(loaded, deps.identifierSystems);
  } catch (error) {
    if (!(error instanceof BundleBuildError)) throw error;
    await stop(db, reportVersionId, 'rejected', { error: error.message, httpStatus: null, issues: [] });
    return { result: 'rejected', error: error.message };
  }
  // Recording which bundle is on its way is not a change of the delivery's state: updated_at stays.
  await db.update(ReportDelivery, { reportVersionId }, { bundleIdentifier: bundleIdentifierOf(version.studyId, version.versionNo), updatedAt: () => 'updated_at' });

  const sent = await deps.send(bundle);
  if (sent.ok) {
    const ids = ehrIdsOf(sent.response);
    const report = ids.find((i) => i.resourceType === 'DiagnosticReport');
    const ehrReportId = report ? `DiagnosticReport/${report.id}` : null;
    await db.update(
      ReportDelivery,
      { reportVersionId },
      {
        status: 'delivered',
        httpStatus: sent.status,
        ehrIds: ids,
        ehrReportId,
        deliveredAt: () => 'now()',
        lastError: null,
        issues: null,
        leaseUntil: null,
        nextAttemptAt: null,
        stoppedAt: null,
        updatedAt: () => 'now()',
      },
    );
    return { result: 'delivered', ehrReportId };
  }

  const failure = { error: sent.message, httpStatus: sent.status ?? null, issues: issuesOf(sent.outcome) };
  if (sent.kind === 'rejected') {
    await stop(db, reportVersionId, 'rejected', failure);
    return { result: 'rejected', error: sent.message };
  }
  const pastLimit = Date.now() - firstAttemptAt.getTime() >= deps.limitMs;
  if (pastLimit || job.attempts >= job.maxAttempts) {
    const error = `${sent.message}; gave up after ${pastLimit ? `the time limit of ${Math.round(deps.limitMs / 60_000)} min` : `${job.attempts} tries`}`;
    await stop(db, reportVersionId, 'given-up', { ...failure, error });
    return { result: 'given-up', error };
  }
  await db
    .createQueryBuilder()
    .update(ReportDelivery)
    .set({
      status: 'failed-retrying',
      lastError: failure.error,
      httpStatus: failure.httpStatus,
      issues: failure.issues,
      nextAttemptAt: () => `now() + :retryDelayMs * interval '1 millisecond'`,
      leaseUntil: null,
      updatedAt: () => 'now()',
    })
    .where({ reportVersionId })
    .setParameter('retryDelayMs', retryDelayMs(job.attempts))
    .execute();
  throw new TransientDeliveryError(sent.message);
}

async function stop(db: EntityManager, reportVersionId: string, status: 'rejected' | 'given-up', failure: { error: string; httpStatus: number | null; issues: DeliveryIssue[] }) {
  // SQL: the delivery stops and the administrators' notice is queued (graphile_worker.add_job) in one
  // statement (its job key keeps it to one notice per version, however often the stop is reached).
  await db.query(
    `WITH stopped AS (
       UPDATE report_delivery
          SET status = $2, last_error = $3, http_status = $4, issues = $5::jsonb, stopped_at = now(),
              lease_until = NULL, next_attempt_at = NULL, updated_at = now()
        WHERE report_version_id = $1
        RETURNING report_version_id)
     SELECT graphile_worker.add_job(identifier => 'send-delivery-failure-notice', payload => json_build_object('reportVersionId', report_version_id),
                                    job_key => 'delivery-failed:' || report_version_id, max_attempts => 25)
       FROM stopped`,
    [reportVersionId, status, failure.error, failure.httpStatus, JSON.stringify(failure.issues)],
  );
}
