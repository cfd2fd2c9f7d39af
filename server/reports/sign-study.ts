import { randomUUID } from 'node:crypto';
import type { SignedVersionSummary } from '../../shared/report/preview';
import type { StudyRecord } from '../../shared/study/schema';
import diagnosticsChannel from 'node:diagnostics_channel';
import type { DataSource, EntityManager } from 'typeorm';
import { checkCompleteness } from '../../shared/report/completeness';
import type { Role } from '../../shared/auth/permissions';
import { checkTransition } from '../../shared/study/state-machine';
import { auditColumns, auditParameters, type AuditActor, type AuditEntry } from '../audit/audit';
import { ReportVersion } from '../db/entities/report-version.entity';
import { InvalidRequestError, RecordNotFoundError } from '../errors';
import { ATTESTATION, prepareSignedView, sha256Hex, signedNarrative, type AmendedVersion } from '../report-document';
import { renderPdfInThread } from '../report-document/pdf-threads';
import { StaleVersionError, studyRecordColumns, studyRecordFrom, studyRecordOf } from '../studies/repository';
import { inPooledTransaction, namedStatement, preparedOn, uuidLiteral } from '../db/prepared';
import type { PoolClient } from 'pg';
import { IncompleteStudyError, TransitionRefusedError } from './errors';
import { jobsOnReportSigned } from './on-report-signed';
import { codingBeforeJoin, codingBeforeOf, codingBeforeSql, planSuggestions, suggestionWrites, type CodingBefore, type PlannedSuggestions } from '../coding/store-suggestions';
import { chooseThresholds, reportInputOf, toAmendedVersion, type AmendedThresholds, type ThresholdsChoice } from './report-input';
import { unstoredSettings } from '../settings/lab-settings';
import { thresholdsInForceOf, type ThresholdsInForce } from '../settings/thresholds';

export interface Signer {
  userId: string;
  displayName: string;
  role: Role | null;
}

export interface SignStudyRequest {
  studyId: string;
  /** The study version the signer previewed; a study changed since then is not signed. */
  studyVersion: number;
  signer: Signer;
  /** Required for an addendum: why the signed report changes. */
  reason?: string | null;
  /** An addendum keeps the amended version's thresholds unless the physician chooses those now in force. */
  thresholds?: ThresholdsChoice;
  hospital: { name: string; lab: string } | null;
  audit: AuditActor;
  /** The signing time; the transaction's clock by default. */
  now?: Date;
}

export type { SignedVersionSummary };

export const summariseVersion = (v: Omit<ReportVersion, 'pdfFile'>, pdfSha256: string): SignedVersionSummary => ({
  id: v.id,
  studyId: v.studyId,
  versionNo: v.versionNo,
  status: v.status,
  signedAt: v.signedAt.toISOString(),
  signerName: v.signerName,
  pdfSha256,
  contentSha256: v.contentSha256,
});

/**
 * Each signature publishes `{ spans, totalMs }` here when someone listens (Node's diagnostics_channel),
 * the milliseconds of its steps: `load` (opening the transaction and locking the study's row in one
 * round trip, then reading its record with the signing context — the previous version, the transaction's time, the
 * thresholds in force, the lab's settings, the operator's name, the coding so far — in one statement,
 * and the checks), `context` (choosing the thresholds), `analysis` (the physiology
 * analysis for the report), `report` (view, canonical content and its SHA-256, then — the PDF rendering
 * in a thread meanwhile — the narrative), `codes` (the code suggestions and what they change, and the
 * storing statement sent), `pdf` (waiting for the thread's PDF, and its SHA-256: the render alone is
 * timed by `pdfRenderedChannel`), `store` (waiting for that statement after the PDF), `store-pdf` (the
 * PDF's row) and `commit`.
 */
export const signStepsChannel = diagnosticsChannel.channel('isobar:sign-steps');

/**
 * Signs exactly what was previewed, in one transaction: the study row is locked, its state and version
 * checked, completeness checked, the report built and stored as an immutable version, the study's state
 * moved, the audit row written and the follow-up jobs queued. Two physicians signing at once: the second
 * waits on the lock, then finds the state or version moved and gets 409.
 */
export async function signStudy(dataSource: DataSource, req: SignStudyRequest): Promise<SignedVersionSummary> {
  const timed = signStepsChannel.hasSubscribers;
  const spans: Record<string, number> = {};
  const began = performance.now();
  let mark = began;
  const step = (name: string) => {
    if (!timed) return;
    const t = performance.now();
    spans[name] = t - mark;
    mark = t;
  };
  // The study's row is locked first (with BEGIN, one round trip); its record and the signing context
  // are then read from a snapshot taken after the lock, so a signer who waited reads what the other
  // writer committed.
  const lockStudy = `SELECT id FROM study WHERE id = ${uuidLiteral(req.studyId)} FOR UPDATE`;
  const summary = await inPooledTransaction(dataSource, lockStudy, async ({ client, opened: [locked] }) => {
    const read = locked ? await signingRead(client, req.studyId, req.now ?? null) : null;
    const record = read?.record ?? null;
    if (!record) throw new RecordNotFoundError('No study has this id.');
    const state = record.state;
    const addendum = state === 'amending';
    const refusal = checkTransition(state, addendum ? 'sign-addendum' : 'sign', req.signer.role, req.reason);
    if (refusal) throw new TransitionRefusedError(refusal, refusal === 'wrong-state' ? `${/^[aeiou]/.test(state) ? 'An' : 'A'} ${state} study cannot be signed.` : refusal === 'reason-required' ? 'An addendum needs the reason for the change.' : 'Only a physician may sign.');
    if (record.version !== req.studyVersion) throw new StaleVersionError(record);
    if (!addendum && req.thresholds === 'original') {
      throw new InvalidRequestError('Only an addendum can keep the thresholds of an earlier version.', [{ pointer: '/thresholds', detail: 'A first signature uses the thresholds in force; leave thresholds out or send "current".' }]);
    }
    const completeness = checkCompleteness(record);
    if (!completeness.complete) throw new IncompleteStudyError(completeness.missing);
    step('load');  // BEGIN with the lock (one round trip), the record with the signing context (one statement), the checks

    const context = read!.context;
    const { previous } = context;
    const signedAt: Date = req.now ?? context.now;
    const thresholds = chooseThresholds(addendum ? previous : null, () => context.inForce, req.thresholds ?? 'original');
    step('context');
    const input = { ...reportInputOf(record, req.hospital, thresholds, context.settings, context.operatorName), amends: addendum ? (previous?.amended ?? null) : null };
    step('analysis');
    const versionNo = (previous?.versionNo ?? 0) + 1;
    const signed = prepareSignedView(input, {
      signer: { id: req.signer.userId, name: req.signer.displayName },
      signedAt: signedAt.toISOString(),
      reportVersion: versionNo,
      amends: previous?.versionNo ?? null,
      amendmentReason: addendum ? (req.reason ?? null) : null,
    });
    // The PDF renders in a thread from here on; the narrative, the code suggestions and the statement
    // that stores the version are made beside it, and PostgreSQL writes that statement meanwhile.
    const rendering = renderPdfInThread(signed.view);
    rendering.catch(() => undefined); // awaited below, where a failure is thrown
    const text = { ...signed, ...signedNarrative(signed.view) };
    step('report');
    const version: StoredVersion = {
      id: randomUUID(),
      studyId: req.studyId,
      versionNo,
      studyVersion: record.version,
      status: previous ? 'amended' : 'final',
      supersedesId: previous?.id ?? null,
      reason: addendum ? (req.reason ?? null) : null,
      narrativeHtml: text.htmlDocument,
      narrativeText: text.narrative.text,
      snapshot: text.content.record,
      analysis: text.content.analysis,
      thresholds: text.content.thresholds,
      templateVersion: text.content.templateVersion,
      thresholdsBasis: input.thresholdsBasis.basis,
      thresholdSetId: input.thresholdsBasis.setId,
      contentSha256: text.fingerprint,
      signedBy: req.signer.userId,
      signerName: req.signer.displayName,
      signedAt,
      attestation: text.content.attestation ?? ATTESTATION,
    };
    // The code suggestions with their rule ids, and the study on the coding queue, in this transaction.
    const coding = planSuggestions(
      { id: version.id, studyId: version.studyId, versionNo, snapshot: version.snapshot, analysis: version.analysis, signedAt },
      context.coding,
      context.settings.timeZone,
    );
    step('codes');
    // The version and everything that follows from it are sent now, on the transaction's connection,
    // and written by PostgreSQL while the thread renders the PDF; the PDF's row comes after.
    const stored = storeSignature(client, version, addendum ? 'amended' : 'signed', coding, {
      ...req.audit,
      action: addendum ? 'sign-addendum' : 'sign',
      entityType: 'study',
      entityId: req.studyId,
      outcome: 'success',
      detail: {
        reportVersion: version.versionNo,
        reportVersionId: version.id,
        fromStudyVersion: record.version,
        contentSha256: version.contentSha256,
        templateVersion: version.templateVersion,
        thresholds: { basis: input.thresholdsBasis.basis, thresholdSetId: input.thresholdsBasis.setId, ...(addendum ? { choice: req.thresholds ?? 'original' } : {}) },
      },
    });
    stored.catch(() => undefined); // awaited below, where a failure is thrown
    // A render that failed or timed out fails the signature; its statement settles first, so the
    // ROLLBACK is never queued behind it on the connection.
    const pdf = await rendering.catch(async (error: unknown) => {
      await stored.catch(() => undefined);
      throw error;
    });
    const pdfSha256 = sha256Hex(pdf);
    step('pdf');
    await stored;
    step('store');
    // The PDF as a parameter, never in the statement's text: PostgreSQL logs the text of a failed statement.
    await preparedOn(client, `INSERT INTO report_pdf (report_version_id, pdf, pdf_sha256) VALUES ($1::uuid, $2::bytea, $3)`, [version.id, pdf, pdfSha256]);
    step('store-pdf');
    return summariseVersion(version, pdfSha256);
  });
  if (timed) {
    step('commit'); // the deferred check that a version has its PDF runs here
    signStepsChannel.publish({ spans, totalMs: performance.now() - began });
  }
  return summary;
}

/** What one statement reads for a signature, beside the locked record. */
interface SigningContext {
  /** The transaction's time. */
  now: Date;
  /** The newest signed version (the one an addendum amends), with the thresholds it used. */
  previous: (AmendedThresholds & { id: string; amended: AmendedVersion }) | null;
  inForce: ThresholdsInForce;
  settings: { templateVersion: string; timeZone: string };
  operatorName: string | null;
  /** The study's coding before this version (its review row locked). */
  coding: CodingBefore;
}

/**
 * After the study's row is locked: its record, and beside it the previous version, the transaction's
 * time, the thresholds in force at the signing time (`at`, else the transaction's time), the lab's
 * settings, the operator's name and the study's coding so far (its review row locked), in one round trip.
 */
async function signingRead(client: PoolClient, studyId: string, at: Date | null): Promise<{ record: StudyRecord; context: SigningContext } | null> {
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  const [row] = await preparedOn<any>(client,
    `SELECT ${studyRecordColumns},
            now() AS now,
            prev.id AS prev_id, prev.version_no AS prev_version_no, prev.thresholds AS prev_thresholds, prev.threshold_set_id AS prev_set_id,
            prev.signed_at AS prev_signed_at, prev.signer_name AS prev_signer_name, prev.content_sha256 AS prev_content_sha256, prev.snapshot AS prev_snapshot,
            (SELECT effective_from FROM threshold_set WHERE id = prev.threshold_set_id) AS prev_set_effective_from,
            ts.id AS set_id, ts.effective_from AS set_effective_from, ts.values AS set_values,
            l.time_zone, l.template_version,
            (SELECT u.display_name FROM app_user u WHERE u.id = s.operator_id) AS operator_name,
            ${codingBeforeSql('$1::uuid', '2147483647')}
     FROM ${studyRecordFrom}
     LEFT JOIN LATERAL (SELECT id, version_no, thresholds, threshold_set_id, signed_at, signer_name, content_sha256, snapshot FROM report_version WHERE study_id = $1 ORDER BY version_no DESC LIMIT 1) prev ON true
     LEFT JOIN LATERAL (SELECT id, effective_from, values FROM threshold_set WHERE effective_from <= COALESCE($2::timestamptz, now()) ORDER BY effective_from DESC, id DESC LIMIT 1) ts ON true
     LEFT JOIN lab_settings l ON l.id = 1
     ${codingBeforeJoin('$1::uuid')}
     WHERE s.id = $1`,
    [studyId, at],
  );
  if (!row) return null;
  return { record: studyRecordOf(row), context: contextOf(row) };
}

// eslint-disable-next-line @typescript-eslint/no-explicit-any
function contextOf(row: any): SigningContext {
  return {
    now: row.now,
    previous:
      row.prev_id === null
        ? null
        : {
            id: row.prev_id,
            versionNo: row.prev_version_no,
            thresholds: row.prev_thresholds,
            thresholdSetId: row.prev_set_id,
            setEffectiveFrom: row.prev_set_effective_from,
            amended: toAmendedVersion({ versionNo: row.prev_version_no, signedAt: row.prev_signed_at, signerName: row.prev_signer_name, contentSha256: row.prev_content_sha256, snapshot: row.prev_snapshot }),
          },
    inForce: thresholdsInForceOf(row.set_id === null ? null : { id: row.set_id, effectiveFrom: row.set_effective_from, values: row.set_values }),
    settings: { templateVersion: row.template_version ?? unstoredSettings.template_version, timeZone: row.time_zone ?? unstoredSettings.time_zone },
    operatorName: row.operator_name ?? null,
    coding: codingBeforeOf(row),
  };
}

/** A report version as stored (the row of `report_version`). */
type StoredVersion = Omit<ReportVersion, 'study' | 'signer' | 'pdfFile'>;

/**
 * Writes a signature in one statement (sent at once, named so each connection plans it once): the immutable version, the study's new state and version, the
 * code suggestions and the coding queue, the audit rows, the "queued" delivery row and the jobs that
 * follow (`jobsOnReportSigned`, one call of the queue's `add_jobs`). PostgreSQL runs every part of it or
 * none; the statement-level triggers (turnaround) run after it as before. The PDF's row follows it.
 */
async function storeSignature(connection: Pick<PoolClient, 'query'>, v: StoredVersion, studyState: 'signed' | 'amended', coding: PlannedSuggestions, audit: AuditEntry): Promise<void> {
  const params: unknown[] = [];
  const p = (value: unknown, cast = '') => `$${params.push(value)}${cast}`;
  const versionValues = [
    p(v.id, '::uuid'), p(v.studyId, '::uuid'), p(v.versionNo, '::int'), p(v.studyVersion, '::int'), p(v.status), p(v.supersedesId, '::uuid'), p(v.reason),
    p(v.narrativeHtml), p(v.narrativeText), p(JSON.stringify(v.snapshot), '::jsonb'), p(JSON.stringify(v.analysis), '::jsonb'), p(JSON.stringify(v.thresholds), '::jsonb'),
    p(v.templateVersion), p(v.thresholdsBasis), p(v.thresholdSetId, '::int'), p(v.contentSha256),
    p(v.signedBy, '::uuid'), p(v.signerName), p(v.signedAt, '::timestamptz'), p(v.attestation),
  ].join(', ');
  const moved = `UPDATE study SET state = ${p(studyState)}, version = version + 1, updated_at = now() WHERE id = ${p(v.studyId, '::uuid')}`;
  const auditRows = [audit, coding.audit].map((entry) => `(${auditParameters(entry).map((x) => p(x)).join(', ')})`).join(', ');
  const jobs = jobsOnReportSigned(v.id)
    .map((j) => `ROW(${p(j.name)}, ${p(JSON.stringify(j.payload), '::json')}, NULL, NULL, ${p(j.options.maxAttempts, '::smallint')}, ${p(j.options.jobKey)}, NULL, NULL)::graphile_worker.job_spec`)
    .join(', ');
  // Sent on the transaction's connection before this function returns its promise, so PostgreSQL
  // writes it while the PDF renders.
  const { rows: [row] } = await connection.query(namedStatement(
    `WITH version AS (
       INSERT INTO report_version (id, study_id, version_no, study_version, status, supersedes_id, reason, narrative_html, narrative_text, snapshot, analysis, thresholds,
                                   template_version, thresholds_basis, threshold_set_id, content_sha256, signed_by, signer_name, signed_at, attestation)
       VALUES (${versionValues})
       RETURNING id, study_id
     ), moved AS (${moved} RETURNING id),
     ${suggestionWrites(coding, p).join(', ')},
     audited AS (INSERT INTO audit_event (${auditColumns}) VALUES ${auditRows}),
     delivery AS (INSERT INTO report_delivery (report_version_id, study_id) SELECT id, study_id FROM version ON CONFLICT (report_version_id) DO NOTHING)
     SELECT (SELECT count(*)::int FROM moved) AS moved, (SELECT count(*)::int FROM graphile_worker.add_jobs(ARRAY[${jobs}])) AS jobs FROM version`,
    params,
  ));
  if (!row || row.moved !== 1) throw new Error('The signature was not stored: the study row was not updated.');
}

export async function latestVersion(manager: EntityManager, studyId: string): Promise<ReportVersion | null> {
  return manager.findOne(ReportVersion, { where: { studyId }, order: { versionNo: 'DESC' } });
}
