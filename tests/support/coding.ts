import { createHash, randomUUID } from 'node:crypto';
import type { JobHelpers } from 'graphile-worker';
import type { DataSource } from 'typeorm';
import { analyzeStudy } from '../../shared/physiology';
import type { StudyRecord } from '../../shared/study/schema';
import { toPhysiologyInput } from '../../shared/study/to-physiology';
import { codingTasks } from '../../server/coding/tasks';
import { createDataSource } from '../../server/db/data-source';
import { createLogger } from '../../server/log';

/**
 * Stores a signed report version of a study as signing does (the record as the snapshot, its
 * analysis beside it) and marks the study signed (or amended). Returns the version's id.
 */
export async function insertReportVersion(
  db: DataSource,
  record: StudyRecord,
  options: { signedBy: string; versionNo?: number; supersedesId?: string | null; reason?: string; signedAt?: Date },
): Promise<string> {
  const versionNo = options.versionNo ?? 1;
  const analysis = analyzeStudy(toPhysiologyInput(record));
  const narrative = `Report of ${record.accession}, version ${versionNo}.`;
  const sha = (s: string) => createHash('sha256').update(s).digest('hex');
  const [row] = await db.query(
    `WITH v AS (
       INSERT INTO report_version (study_id, version_no, study_version, status, supersedes_id, reason, narrative_html, narrative_text, snapshot, analysis,
                                   thresholds, template_version, content_sha256, signed_by, signer_name, signed_at, attestation)
       VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, '{}', 'test-1', $13, $14, 'Test Physician', $15, 'I attest.') RETURNING id)
     INSERT INTO report_pdf (report_version_id, pdf, pdf_sha256) SELECT id, $11, $12 FROM v RETURNING report_version_id AS id`,
    [
      record.id,
      versionNo,
      record.version,
      options.supersedesId ? 'amended' : 'final',
      options.supersedesId ?? null,
      options.reason ?? null,
      `<p>${narrative}</p>`,
      narrative,
      JSON.stringify(record),
      JSON.stringify(analysis),
      Buffer.from('%PDF-1.4 test'),
      sha('%PDF-1.4 test'),
      sha(`${record.id}:${versionNo}:${randomUUID()}`),
      options.signedBy,
      options.signedAt ?? new Date(),
    ],
  );
  await db.query(`UPDATE study SET state = $2 WHERE id = $1`, [record.id, options.supersedesId ? 'amended' : 'signed']);
  return row.id as string;
}

/** Runs the `suggest-codes` task as the worker would, on a DataSource (a connection) of its own. */
export async function runSuggestCodes(reportVersionId: string): Promise<string[]> {
  const dataSource = createDataSource(process.env.DATABASE_URL!, 1, createLogger('silent'));
  await dataSource.initialize();
  const logged: string[] = [];
  const helpers = {
    logger: { info: (m: string) => logged.push(m), warn: (m: string) => logged.push(m), error: (m: string) => logged.push(m), debug: () => undefined },
  } as unknown as JobHelpers;
  try {
    await codingTasks(dataSource)['suggest-codes']!({ reportVersionId }, helpers);
  } finally {
    await dataSource.destroy();
  }
  return logged;
}

/**
 * A signed study for the coder: an intermediate LAD lesion with a low FFR and a resting ratio in the
 * circumflex, after coronary angiography with left heart catheterization, outpatient, professional
 * claim, hospital. Written through the repository as the form would, then signed and suggested.
 */
export async function signedCodingStudy(db: DataSource, signedBy: string, familyName = 'Halloran'): Promise<StudyRecord> {
  const { createStudy, patchStudy, loadStudy } = await import('../../server/studies/repository');
  const { emptyStudyCoding, emptyVessel, emptyDetails, emptySetup } = await import('../../shared/study/schema');
  const id = await createStudy(db, { patient: { mrn: `CB-${randomUUID().slice(0, 8)}`, familyName, givenName: 'Bea', birthDate: '1958-02-14', sex: 'female' } }, null);
  const created = (await loadStudy(db, id))!;
  await patchStudy(db, id, {
    version: created.version,
    details: { ...emptyDetails(), procedureStartedAt: '2025-03-11T09:00:00.000Z', procedureEndedAt: '2025-03-11T10:00:00.000Z', operatorId: signedBy, anginaPresent: true, clinicalQuestion: 'intermediate-lesion', indication: 'Intermediate LAD lesion' },
    setup: { ...emptySetup(), hyperemicAgent: 'adenosine' },
    vessels: [
      { ...emptyVessel(randomUUID(), 'LAD'), restPa: 92, restPd: 80, hyperemiaPa: 88, hyperemiaPd: 66 },
      { ...emptyVessel(randomUUID(), 'LCX'), nhprKind: 'whole-cycle', nhprValue: 0.95 },
    ],
    coding: { ...emptyStudyCoding(), patientClass: 'outpatient', billing: 'professional', setting: 'hospital', diagnosticCath: 'done', coronaryAngiography: true, leftHeart: true },
  });
  const record = (await loadStudy(db, id))!;
  await runSuggestCodes(await insertReportVersion(db, record, { signedBy }));
  return record;
}
