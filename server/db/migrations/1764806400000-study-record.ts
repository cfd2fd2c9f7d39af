import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * The structured study record: case details, setup and quality steps and findings on the study;
 * measurements in their own tables (vessel assessments → thermodilution injections; acetylcholine
 * doses); attachments; indexes for the worklist's keyset pagination and filters.
 */
export class StudyRecord1764806400000 implements MigrationInterface {
  name = 'StudyRecord1764806400000';

  async up(db: QueryRunner): Promise<void> {
    await db.query(`
      ALTER TABLE study
        ADD COLUMN encounter text NULL,
        ADD COLUMN referring_name text NULL,
        ADD COLUMN referring_email text NULL,
        ADD COLUMN access_site text NULL,
        ADD COLUMN guide_french smallint NULL CHECK (guide_french BETWEEN 4 AND 8),
        ADD COLUMN transducer_zeroed boolean NULL,
        ADD COLUMN nitrates_given boolean NULL,
        ADD COLUMN nitrate_dose_ug numeric NULL,
        ADD COLUMN equalized_in_aorta boolean NULL,
        ADD COLUMN introducer_removed boolean NULL,
        ADD COLUMN wire_position text NULL,
        ADD COLUMN hyperemic_agent text NULL,
        ADD COLUMN hyperemic_route text NULL,
        ADD COLUMN hyperemic_dose numeric NULL,
        ADD COLUMN hyperemic_dose_unit text NULL,
        ADD COLUMN heparin_units numeric NULL,
        ADD COLUMN nitrate_reversal boolean NULL,
        ADD COLUMN complications text NULL,
        ADD COLUMN contrast_ml numeric NULL,
        ADD COLUMN fluoroscopy_minutes numeric NULL,
        ADD COLUMN impression text NULL,
        ADD COLUMN plan text NULL,
        ADD COLUMN created_by uuid NULL REFERENCES app_user (id) ON DELETE SET NULL,
        -- The worklist's order: when the case happened, or when the record was opened if not yet known.
        ADD COLUMN sort_at timestamptz GENERATED ALWAYS AS (COALESCE(procedure_started_at, created_at)) STORED`);
    await db.query(`CREATE INDEX study_worklist_idx ON study (sort_at DESC, id DESC)`);
    await db.query(`CREATE INDEX study_state_worklist_idx ON study (state, sort_at DESC, id DESC)`);
    await db.query(`CREATE INDEX study_operator_worklist_idx ON study (operator_id, sort_at DESC, id DESC)`);
    await db.query(`CREATE INDEX patient_family_name_idx ON patient (lower(family_name) text_pattern_ops)`);

    await db.query(`
      CREATE TABLE vessel_assessment (
        id uuid PRIMARY KEY,
        study_id uuid NOT NULL REFERENCES study (id) ON DELETE CASCADE,
        position smallint NOT NULL,
        vessel text NOT NULL,
        segment smallint NULL CHECK (segment BETWEEN 1 AND 18),
        visual_stenosis_pct numeric NULL,
        rest_pa numeric NULL,
        rest_pd numeric NULL,
        hyperemia_pa numeric NULL,
        hyperemia_pd numeric NULL,
        console_ffr numeric NULL,
        nhpr_kind text NULL,
        nhpr_value numeric NULL,
        wedge_pressure numeric NULL,
        drift_pd_pa numeric NULL,
        pullback_pattern text NULL,
        decision text NULL,
        CONSTRAINT vessel_assessment_position_key UNIQUE (study_id, position)
      )`);
    await db.query(`
      CREATE TABLE thermodilution_injection (
        vessel_assessment_id uuid NOT NULL REFERENCES vessel_assessment (id) ON DELETE CASCADE,
        phase text NOT NULL CHECK (phase IN ('rest', 'hyperemia')),
        position smallint NOT NULL,
        transit_s numeric NOT NULL CHECK (transit_s > 0),
        PRIMARY KEY (vessel_assessment_id, phase, position)
      )`);
    await db.query(`
      CREATE TABLE acetylcholine_dose (
        id uuid PRIMARY KEY,
        study_id uuid NOT NULL REFERENCES study (id) ON DELETE CASCADE,
        position smallint NOT NULL,
        vessel text NOT NULL,
        micrograms numeric NULL,
        constriction_pct numeric NULL,
        symptoms boolean NULL,
        ischemic_ecg boolean NULL,
        CONSTRAINT acetylcholine_dose_position_key UNIQUE (study_id, position)
      )`);
    await db.query(`
      CREATE TABLE attachment (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        study_id uuid NOT NULL REFERENCES study (id) ON DELETE CASCADE,
        file_name text NOT NULL,
        media_type text NOT NULL,
        size_bytes bigint NOT NULL,
        sha256 char(64) NOT NULL,
        storage_key text NOT NULL,
        uploaded_by uuid NULL REFERENCES app_user (id) ON DELETE SET NULL,
        uploaded_at timestamptz NOT NULL DEFAULT now()
      )`);
    await db.query(`CREATE INDEX attachment_study_idx ON attachment (study_id, uploaded_at)`);
  }

  async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE attachment`);
    await db.query(`DROP TABLE acetylcholine_dose`);
    await db.query(`DROP TABLE thermodilution_injection`);
    await db.query(`DROP TABLE vessel_assessment`);
    await db.query(`DROP INDEX patient_family_name_idx`);
    await db.query(`DROP INDEX study_operator_worklist_idx`);
    await db.query(`DROP INDEX study_state_worklist_idx`);
    await db.query(`DROP INDEX study_worklist_idx`);
    await db.query(`
      ALTER TABLE study
        DROP COLUMN sort_at, DROP COLUMN created_by, DROP COLUMN plan, DROP COLUMN impression,
        DROP COLUMN fluoroscopy_minutes, DROP COLUMN contrast_ml, DROP COLUMN complications,
        DROP COLUMN nitrate_reversal, DROP COLUMN heparin_units, DROP COLUMN hyperemic_dose_unit,
        DROP COLUMN hyperemic_dose, DROP COLUMN hyperemic_route, DROP COLUMN hyperemic_agent,
        DROP COLUMN wire_position, DROP COLUMN introducer_removed, DROP COLUMN equalized_in_aorta,
        DROP COLUMN nitrate_dose_ug, DROP COLUMN nitrates_given, DROP COLUMN transducer_zeroed,
        DROP COLUMN guide_french, DROP COLUMN access_site, DROP COLUMN referring_email,
        DROP COLUMN referring_name, DROP COLUMN encounter`);
  }
}
