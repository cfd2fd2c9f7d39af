import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Users, patients and studies: the records every later feature hangs from. */
export class InitialSchema1764633600000 implements MigrationInterface {
  name = 'InitialSchema1764633600000';

  async up(db: QueryRunner): Promise<void> {
    await db.query(`
      CREATE TABLE app_user (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        issuer text NOT NULL,
        subject text NOT NULL,
        email text NOT NULL,
        display_name text NOT NULL,
        role text NULL CHECK (role IN ('staff', 'physician', 'coder', 'chief', 'admin')),
        last_sign_in_at timestamptz NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        updated_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT app_user_issuer_subject_key UNIQUE (issuer, subject)
      )`);
    await db.query(`
      CREATE TABLE patient (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        mrn text NOT NULL CONSTRAINT patient_mrn_key UNIQUE,
        family_name text NOT NULL,
        given_name text NOT NULL,
        birth_date date NOT NULL,
        sex text NOT NULL CHECK (sex IN ('male', 'female', 'other', 'unknown')),
        created_at timestamptz NOT NULL DEFAULT now(),
        updated_at timestamptz NOT NULL DEFAULT now()
      )`);
    await db.query(`
      CREATE TABLE study (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        accession text NOT NULL CONSTRAINT study_accession_key UNIQUE,
        patient_id uuid NOT NULL REFERENCES patient (id) ON DELETE RESTRICT,
        state text NOT NULL DEFAULT 'draft'
          CHECK (state IN ('draft', 'awaiting-signature', 'signed', 'amended')),
        procedure_started_at timestamptz NULL,
        procedure_ended_at timestamptz NULL,
        operator_id uuid NULL REFERENCES app_user (id) ON DELETE SET NULL,
        indication text NULL,
        clinical_question text NULL,
        version integer NOT NULL DEFAULT 1,
        created_at timestamptz NOT NULL DEFAULT now(),
        updated_at timestamptz NOT NULL DEFAULT now()
      )`);
    await db.query(`CREATE INDEX study_patient_idx ON study (patient_id)`);
  }

  async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE study`);
    await db.query(`DROP TABLE patient`);
    await db.query(`DROP TABLE app_user`);
  }
}
