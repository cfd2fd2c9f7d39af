import type { DataSource } from 'typeorm';
import { demoPatients, demoStudies, demoUsers } from './scenario';

/**
 * Loads the demo scenario. Idempotent: rows are keyed by their natural keys (issuer + subject,
 * MRN, accession) and left alone when they already exist, so edits made in the demo survive.
 */
export async function seedDemo(dataSource: DataSource, issuer: string, now = new Date()): Promise<void> {
  await dataSource.transaction(async (db) => {
    for (const u of demoUsers) {
      await db.query(
        `INSERT INTO app_user (issuer, subject, email, display_name, role) VALUES ($1, $2, $3, $4, $5)
         ON CONFLICT (issuer, subject) DO NOTHING`,
        [issuer, u.subject, u.email, u.displayName, u.role],
      );
    }
    for (const p of demoPatients) {
      await db.query(
        `INSERT INTO patient (mrn, family_name, given_name, birth_date, sex) VALUES ($1, $2, $3, $4, $5)
         ON CONFLICT (mrn) DO NOTHING`,
        [p.mrn, p.familyName, p.givenName, p.birthDate, p.sex],
      );
    }
    const [operator] = await db.query(`SELECT id FROM app_user WHERE issuer = $1 AND subject = 'demo-physician'`, [issuer]);
    for (const s of demoStudies) {
      const ended = new Date(now.getTime() - s.endedHoursAgo * 3_600_000);
      const started = new Date(ended.getTime() - 55 * 60_000);
      await db.query(
        `INSERT INTO study (accession, patient_id, state, procedure_started_at, procedure_ended_at, operator_id, indication, clinical_question)
         SELECT $1, p.id, $2, $3, $4, $5, $6, $7 FROM patient p WHERE p.mrn = $8
         ON CONFLICT (accession) DO NOTHING`,
        [s.accession, s.state, started, ended, operator?.id ?? null, s.indication, s.clinicalQuestion, s.mrn],
      );
    }
  });
}
