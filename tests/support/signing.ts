import { createHash, randomUUID } from 'node:crypto';
import type { DataSource } from 'typeorm';
import { enqueueDelivery } from '../../server/ehr/enqueue-delivery';
import { changeStudyState } from '../../server/reports/change-study-state';
import { signStudy } from '../../server/reports/sign-study';
import { createStudy, loadStudy, patchStudy } from '../../server/studies/repository';
import { createStudy as createSignedStudyRow } from './factories';
import { emptyDetails, emptyFindings, emptySetup, emptyStudyCoding, emptyVessel } from '../../shared/study/schema';

export interface Physician {
  id: string;
  name: string;
}

/** A physician of our own (invented) who operates and signs. */
export async function createPhysician(db: DataSource, name = 'Dr Invented Signer'): Promise<Physician> {
  const [row] = await db.query(
    `INSERT INTO app_user (issuer, subject, email, display_name, role) VALUES ('test', $1, 'signer@example.test', $2, 'physician') RETURNING id`,
    [`physician-${randomUUID()}`, name],
  );
  return { id: row.id as string, name };
}

export interface SignedStudy {
  studyId: string;
  reportVersionId: string;
  accession: string;
  mrn: string;
}

/**
 * A complete single-lesion study for an invented patient (FFR 72/90 = 0.80), written through the
 * repository as the form writes it, marked ready and signed through the signing code, which queues
 * its EHR delivery in the same transaction. An encounter number is recorded; the patient class only
 * when given.
 */
export async function signCompleteStudy(db: DataSource, physician: Physician, options: { patientClass?: 'inpatient' | 'outpatient' | null } = {}): Promise<SignedStudy> {
  const mrn = `D-${randomUUID().slice(0, 8).toUpperCase()}`;
  const id = await createStudy(db, { patient: { mrn, familyName: 'Testperson', givenName: 'Ada', birthDate: '1962-04-17', sex: 'female' } }, null);
  const created = (await loadStudy(db, id))!;
  const { record } = await patchStudy(db, id, {
    version: created.version,
    details: {
      ...emptyDetails(),
      encounter: `ENC-${mrn}`,
      procedureStartedAt: '2026-03-02T08:10:00.000Z',
      procedureEndedAt: '2026-03-02T09:05:00.000Z',
      operatorId: physician.id,
      clinicalQuestion: 'intermediate-lesion',
      indication: 'Intermediate LAD lesion',
    },
    setup: { ...emptySetup(), hyperemicAgent: 'adenosine' },
    vessels: [{ ...emptyVessel(randomUUID(), 'LAD'), restPa: 100, restPd: 95, hyperemiaPa: 90, hyperemiaPd: 72, driftPdPa: 1.0, decision: 'pci' }],
    findings: { ...emptyFindings(), complicationKinds: ['none'], impression: 'Invented impression: significant LAD lesion.', plan: 'Stent.' },
    coding: { ...emptyStudyCoding(), patientClass: options.patientClass ?? null },
  });
  const audit = { actorUserId: physician.id, actorName: physician.name, actorRole: 'physician' as const, clientAddress: null };
  const ready = await changeStudyState(db, { studyId: id, action: 'mark-ready', studyVersion: record.version, role: 'physician', audit });
  const signed = await signStudy(db, { studyId: id, studyVersion: ready.version, signer: { userId: physician.id, displayName: physician.name, role: 'physician' }, hospital: null, audit });
  return { studyId: id, reportVersionId: signed.id, accession: record.accession, mrn };
}

/**
 * Another signed study like `template` (signed through the signing code), in a fraction of the time a
 * signature takes (the PDF is rendered once): a new patient and study, and a copy of the template's
 * version whose snapshot names them, stored with its EHR delivery queued in one transaction, as
 * signing queues it. For tests that need many signed reports.
 */
export async function cloneSignedStudy(db: DataSource, template: SignedStudy): Promise<SignedStudy> {
  const study = await createSignedStudyRow(db, { state: 'signed' });
  const reportVersionId = await db.transaction(async (m) => {
    const [row] = await m.query(`SELECT snapshot FROM report_version WHERE id = $1`, [template.reportVersionId]);
    const snapshot = row.snapshot as { id: string; accession: string; patient: { mrn: string }; details: { encounter: string | null } };
    snapshot.id = study.id;
    snapshot.accession = study.accession;
    snapshot.patient.mrn = study.patient.mrn;
    snapshot.details.encounter = `ENC-${study.patient.mrn}`;
    const [inserted] = await m.query(
      `WITH v AS (
         INSERT INTO report_version (study_id, version_no, study_version, status, narrative_html, narrative_text, snapshot, analysis, thresholds,
                                     template_version, content_sha256, signed_by, signer_name, signed_at, attestation)
         SELECT $1, 1, 1, 'final', narrative_html, narrative_text, $2::jsonb, analysis, thresholds,
                template_version, $3, signed_by, signer_name, now(), attestation
           FROM report_version WHERE id = $4
         RETURNING id)
       INSERT INTO report_pdf (report_version_id, pdf, pdf_sha256) SELECT v.id, f.pdf, f.pdf_sha256 FROM v, report_pdf f WHERE f.report_version_id = $4
       RETURNING report_version_id AS id`,
      [study.id, JSON.stringify(snapshot), createHash('sha256').update(`${study.id}/v1`).digest('hex'), template.reportVersionId],
    );
    await enqueueDelivery(m, inserted.id);
    return inserted.id as string;
  });
  return { studyId: study.id, reportVersionId, accession: study.accession, mrn: study.patient.mrn };
}
