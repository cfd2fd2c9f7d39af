import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Facts the report and the codes need: body size and angina; baseline haemodynamics and LVEDP; when
 * nitroglycerin was given; per vessel TIMI flow, corrected frame count and why a drift check was not
 * done; per acetylcholine dose the haemodynamics and where and how spasm was seen; the nitroglycerin
 * given after the test; structured complications; radiation dose. Segments move from the CT model's
 * numbers to the angiographic (CASS / SYNTAX) codes, stored as text; the lab's thresholds get a table
 * with the date each set takes effect.
 */
export class StudyRecordDetails1765065600000 implements MigrationInterface {
  name = 'StudyRecordDetails1765065600000';

  async up(db: QueryRunner): Promise<void> {
    await db.query(`
      ALTER TABLE study
        ADD COLUMN weight_kg numeric NULL,
        ADD COLUMN height_cm numeric NULL,
        ADD COLUMN angina_present boolean NULL,
        ADD COLUMN angina_character text NULL,
        ADD COLUMN nitrate_timing text NULL,
        ADD COLUMN baseline_heart_rate smallint NULL,
        ADD COLUMN baseline_systolic smallint NULL,
        ADD COLUMN baseline_diastolic smallint NULL,
        ADD COLUMN baseline_rhythm text NULL,
        ADD COLUMN lvedp numeric NULL,
        ADD COLUMN reversal_ntg_ug numeric NULL,
        ADD COLUMN reversal_ntg_at timestamptz NULL,
        ADD COLUMN complication_kinds text[] NOT NULL DEFAULT '{}',
        ADD COLUMN air_kerma_mgy numeric NULL,
        ADD COLUMN dose_area_product_gycm2 numeric NULL`);
    await db.query(`
      ALTER TABLE vessel_assessment
        ADD COLUMN drift_not_done_reason text NULL,
        ADD COLUMN timi_flow smallint NULL CHECK (timi_flow BETWEEN 0 AND 3),
        ADD COLUMN corrected_frame_count numeric NULL`);
    await db.query(`
      ALTER TABLE acetylcholine_dose
        ADD COLUMN heart_rate smallint NULL,
        ADD COLUMN systolic smallint NULL,
        ADD COLUMN diastolic smallint NULL,
        ADD COLUMN rhythm text NULL,
        ADD COLUMN spasm_vessel text NULL,
        ADD COLUMN spasm_segment text NULL,
        ADD COLUMN spasm_pattern text NULL`);

    // CT model numbers → angiographic codes: OM1 12 → 12a, OM2 14 → 12b, ramus 17 → 12,
    // left posterolateral 18 → 14; the others keep their number.
    await db.query(`ALTER TABLE vessel_assessment DROP CONSTRAINT IF EXISTS vessel_assessment_segment_check`);
    await db.query(`
      ALTER TABLE vessel_assessment ALTER COLUMN segment TYPE text USING (
        CASE segment WHEN 12 THEN '12a' WHEN 14 THEN '12b' WHEN 17 THEN '12' WHEN 18 THEN '14' ELSE segment::text END)`);

    await db.query(`
      CREATE TABLE threshold_set (
        id serial PRIMARY KEY,
        effective_from timestamptz NOT NULL,
        "values" jsonb NOT NULL,
        note text NULL,
        created_by uuid NULL REFERENCES app_user (id) ON DELETE SET NULL,
        created_at timestamptz NOT NULL DEFAULT now()
      )`);
    await db.query(`CREATE INDEX threshold_set_effective_idx ON threshold_set (effective_from DESC, id DESC)`);
  }

  async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE threshold_set`);
    await db.query(`
      ALTER TABLE vessel_assessment ALTER COLUMN segment TYPE smallint USING (
        CASE segment WHEN '12a' THEN 12 WHEN '12b' THEN 14 WHEN '12' THEN 17 WHEN '14' THEN 18
          ELSE NULLIF(regexp_replace(segment, '[^0-9]', '', 'g'), '')::smallint END)`);
    await db.query(`ALTER TABLE vessel_assessment ADD CONSTRAINT vessel_assessment_segment_check CHECK (segment BETWEEN 1 AND 18)`);
    await db.query(`
      ALTER TABLE acetylcholine_dose
        DROP COLUMN spasm_pattern, DROP COLUMN spasm_segment, DROP COLUMN spasm_vessel, DROP COLUMN rhythm,
        DROP COLUMN diastolic, DROP COLUMN systolic, DROP COLUMN heart_rate`);
    await db.query(`ALTER TABLE vessel_assessment DROP COLUMN corrected_frame_count, DROP COLUMN timi_flow, DROP COLUMN drift_not_done_reason`);
    await db.query(`
      ALTER TABLE study
        DROP COLUMN dose_area_product_gycm2, DROP COLUMN air_kerma_mgy, DROP COLUMN complication_kinds,
        DROP COLUMN reversal_ntg_at, DROP COLUMN reversal_ntg_ug, DROP COLUMN lvedp, DROP COLUMN baseline_rhythm,
        DROP COLUMN baseline_diastolic, DROP COLUMN baseline_systolic, DROP COLUMN baseline_heart_rate,
        DROP COLUMN nitrate_timing, DROP COLUMN angina_character, DROP COLUMN angina_present,
        DROP COLUMN height_cm, DROP COLUMN weight_kg`);
  }
}
