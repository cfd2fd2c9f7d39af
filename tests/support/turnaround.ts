import { createHash, randomUUID } from 'node:crypto';
import type { DataSource } from 'typeorm';
import { analyzeStudy, type PhysiologyInput } from '../../shared/physiology';
import { defaultThresholds } from '../../shared/physiology/thresholds';
import { createPatient } from './factories';

const H = 3_600_000;

export interface StudySeed {
  accession?: string;
  operatorId?: string | null;
  endedAt?: Date | null;
  startedAt?: Date | null;
  createdAt?: Date;
  signedAfterH?: number;
  signerId?: string;
  codedAfterSignH?: number;
  deliveredAfterSignH?: number;
  /** Vessels as the record stores them (snapshot) and as the physiology core reads them. */
  vessels?: { snapshot: Record<string, unknown>; input: PhysiologyInput['vessels'][number] }[];
}

/**
 * Invented studies with their first signature, completed code review and EHR delivery, stored as the
 * product stores them (the turnaround summary follows through its triggers), and invented users.
 */
export function turnaroundSeeder(db: DataSource, tag: string) {
  async function user(name: string, role: string, email: string | null): Promise<string> {
    const [row] = await db.query(
      `INSERT INTO app_user (issuer, subject, email, display_name, role) VALUES ('test-turnaround', $1, $2, $3, $4) RETURNING id`,
      [randomUUID(), email ?? '', name, role],
    );
    return row.id;
  }

  /** A study with its first signature, completed code review and EHR delivery stored as the product stores them. */
  async function seedStudy(s: StudySeed): Promise<{ id: string; accession: string }> {
    const patient = await createPatient(db);
    const accession = s.accession ?? `TA-${tag}-${randomUUID().slice(0, 6)}`;
    const signed = s.signedAfterH !== undefined;
    const [study] = await db.query(
      `INSERT INTO study (accession, patient_id, state, procedure_started_at, procedure_ended_at, operator_id, created_at)
       VALUES ($1, $2, $3, $4, $5, $6, COALESCE($7::timestamptz, now())) RETURNING id`,
      [accession, patient.id, signed ? 'signed' : 'draft', s.startedAt ?? null, s.endedAt ?? null, s.operatorId ?? null, s.createdAt ?? null],
    );
    if (!signed) return { id: study.id, accession };
    const start = (s.endedAt ?? s.startedAt ?? s.createdAt)!;
    const signedAt = new Date(start.getTime() + s.signedAfterH! * H);
    const vessels = s.vessels ?? [];
    const analysis = analyzeStudy({ vessels: vessels.map((v) => v.input) });
    const [version] = await db.query(
      `WITH v AS (
         INSERT INTO report_version (study_id, version_no, study_version, status, narrative_html, narrative_text, snapshot, analysis, thresholds,
                                     template_version, content_sha256, signed_by, signer_name, signed_at, attestation)
         VALUES ($1, 1, 1, 'final', '<p>Invented</p>', 'Invented', $2::jsonb, $3::jsonb, $4::jsonb, 'v1', $6, $7, 'Invented signer', $8, 'Invented attestation')
         RETURNING id)
       INSERT INTO report_pdf (report_version_id, pdf, pdf_sha256) SELECT id, $5::bytea, encode(sha256($5::bytea), 'hex') FROM v RETURNING report_version_id AS id`,
      [study.id, JSON.stringify({ vessels: vessels.map((v) => v.snapshot) }), JSON.stringify(analysis), JSON.stringify(defaultThresholds), Buffer.from('%PDF-invented'), createHash('sha256').update(study.id).digest('hex'), s.signerId ?? s.operatorId, signedAt],
    );
    if (s.codedAfterSignH !== undefined) {
      const [set] = await db.query(
        `INSERT INTO code_suggestion_set (report_version_id, study_id, version_no, warnings, caution) VALUES ($1, $2, 1, '[]', 'Invented caution') RETURNING id`,
        [version.id, study.id],
      );
      // Queued first, completed later: the completion is an UPDATE, as the coder's review makes it.
      await db.query(`INSERT INTO coding_review (study_id, status, current_set_id, queued_at) VALUES ($1, 'to-code', $2, $3)`, [study.id, set.id, signedAt]);
      await db.query(`UPDATE coding_review SET status = 'coded', completed_at = $2, completer_name = 'Invented coder' WHERE study_id = $1`, [
        study.id,
        new Date(signedAt.getTime() + s.codedAfterSignH * H),
      ]);
    }
    if (s.deliveredAfterSignH !== undefined) {
      await db.query(
        `INSERT INTO report_delivery (report_version_id, study_id, status, attempts, delivered_at) VALUES ($1, $2, 'delivered', 1, $3)`,
        [version.id, study.id, new Date(signedAt.getTime() + s.deliveredAfterSignH * H)],
      );
    }
    return { id: study.id, accession };
  }


  return { user, seedStudy };
}
