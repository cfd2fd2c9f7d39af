import { randomUUID } from 'node:crypto';
import type { DataSource } from 'typeorm';

const unique = () => randomUUID().slice(0, 8).toUpperCase();

/** An invented patient with a unique MRN. */
export async function createPatient(db: DataSource, fields: Partial<{ familyName: string; givenName: string }> = {}) {
  const mrn = `T-${unique()}`;
  const [row] = await db.query(
    `INSERT INTO patient (mrn, family_name, given_name, birth_date, sex) VALUES ($1, $2, $3, '1962-04-17', 'female') RETURNING id, mrn`,
    [mrn, fields.familyName ?? 'Testperson', fields.givenName ?? 'Ada'],
  );
  return row as { id: string; mrn: string };
}

/** A study for a new patient, with a unique accession. */
export async function createStudy(db: DataSource, fields: Partial<{ state: string; endedHoursAgo: number }> = {}) {
  const patient = await createPatient(db);
  const [row] = await db.query(
    `INSERT INTO study (accession, patient_id, state, procedure_ended_at)
     VALUES ($1, $2, $3, now() - make_interval(secs => $4)) RETURNING id, accession`,
    [`ACC-${unique()}`, patient.id, fields.state ?? 'draft', (fields.endedHoursAgo ?? 1) * 3600],
  );
  return { ...(row as { id: string; accession: string }), patient };
}
