import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Coding. The study records what coding needs beyond the physiology: the encounter (patient class,
 * billing context, setting), the diagnostic catheterization of the same session and its parts, the
 * interventions per vessel, and whether angina is documented — `NULL` meaning "not recorded yet".
 *
 * Each signed report version gets one set of code suggestions (the engine's input and result and
 * one row per suggested line). Suggested lines are never changed: the coder's decisions (accept,
 * edit with a reason, reject with a reason) are appended as rows, the newest one per line counting,
 * and codes the coder adds are lines of their own. One review row per study carries its status
 * (to-code → in-review → coded) and the set in force; an addendum's set takes its place.
 */
export class CodeReview1765238400000 implements MigrationInterface {
  name = 'CodeReview1765238400000';

  async up(db: QueryRunner): Promise<void> {
    await db.query(`
      ALTER TABLE study
        ADD COLUMN coding_patient_class text NULL CHECK (coding_patient_class IN ('outpatient', 'inpatient')),
        ADD COLUMN coding_billing text NULL CHECK (coding_billing IN ('professional', 'facility')),
        ADD COLUMN coding_setting text NULL CHECK (coding_setting IN ('hospital', 'office')),
        ADD COLUMN diagnostic_cath text NULL CHECK (diagnostic_cath IN ('done', 'none')),
        ADD COLUMN cath_coronary_angiography boolean NOT NULL DEFAULT false,
        ADD COLUMN cath_left_heart boolean NOT NULL DEFAULT false,
        ADD COLUMN cath_left_ventriculography boolean NOT NULL DEFAULT false,
        ADD COLUMN cath_right_heart boolean NOT NULL DEFAULT false,
        ADD COLUMN cath_graft_angiography boolean NOT NULL DEFAULT false,
        ADD COLUMN coding_angina boolean NULL`);
    await db.query(`
      CREATE TABLE coronary_intervention (
        id uuid PRIMARY KEY,
        study_id uuid NOT NULL REFERENCES study (id) ON DELETE CASCADE,
        position smallint NOT NULL,
        vessel text NOT NULL,
        kind text NOT NULL CHECK (kind IN ('balloon', 'stent', 'atherectomy', 'atherectomy-stent')),
        branch boolean NOT NULL DEFAULT false,
        stent text NULL CHECK (stent IN ('drug-eluting', 'bare-metal')),
        CONSTRAINT coronary_intervention_position_key UNIQUE (study_id, position)
      )`);

    await db.query(`
      CREATE TABLE code_suggestion_set (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        report_version_id uuid NOT NULL REFERENCES report_version (id) ON DELETE RESTRICT,
        study_id uuid NOT NULL REFERENCES study (id) ON DELETE RESTRICT,
        version_no integer NOT NULL,
        previous_set_id uuid NULL REFERENCES code_suggestion_set (id) ON DELETE RESTRICT,
        input jsonb NULL,
        warnings jsonb NOT NULL,
        code_sets jsonb NULL,
        caution text NOT NULL,
        failure text NULL,
        created_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT code_suggestion_set_version_key UNIQUE (report_version_id)
      )`);
    await db.query(`CREATE INDEX code_suggestion_set_study_idx ON code_suggestion_set (study_id, version_no)`);

    await db.query(`
      CREATE TABLE code_line (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        set_id uuid NOT NULL REFERENCES code_suggestion_set (id) ON DELETE RESTRICT,
        position smallint NOT NULL,
        origin text NOT NULL CHECK (origin IN ('suggested', 'added')),
        system text NOT NULL CHECK (system IN ('CPT', 'HCPCS', 'ICD-10-CM', 'ICD-10-PCS')),
        code text NOT NULL,
        units integer NOT NULL CHECK (units >= 1),
        modifiers text[] NOT NULL DEFAULT '{}',
        rule_id text NULL,
        rationale text NULL,
        description text NULL,
        add_on boolean NOT NULL DEFAULT false,
        code_set text NULL,
        source text NULL,
        added_by uuid NULL REFERENCES app_user (id) ON DELETE RESTRICT,
        created_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT code_line_position_key UNIQUE (set_id, position),
        CONSTRAINT code_line_suggested_has_rule CHECK ((origin = 'suggested') = (rule_id IS NOT NULL))
      )`);

    await db.query(`
      CREATE TABLE code_decision (
        id bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
        line_id uuid NOT NULL REFERENCES code_line (id) ON DELETE RESTRICT,
        decision text NOT NULL CHECK (decision IN ('accept', 'edit', 'reject', 'add')),
        code text NULL,
        units integer NULL CHECK (units >= 1),
        modifiers text[] NULL,
        reason text NULL,
        decided_by uuid NOT NULL REFERENCES app_user (id) ON DELETE RESTRICT,
        decider_name text NOT NULL,
        decided_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT code_decision_edit_complete CHECK (decision <> 'edit' OR (code IS NOT NULL AND units IS NOT NULL AND modifiers IS NOT NULL AND reason IS NOT NULL)),
        CONSTRAINT code_decision_reject_reason CHECK (decision <> 'reject' OR reason IS NOT NULL)
      )`);
    await db.query(`CREATE INDEX code_decision_line_idx ON code_decision (line_id, id)`);

    await db.query(`
      CREATE TABLE coding_review (
        study_id uuid PRIMARY KEY REFERENCES study (id) ON DELETE RESTRICT,
        status text NOT NULL CHECK (status IN ('to-code', 'in-review', 'coded')),
        current_set_id uuid NOT NULL REFERENCES code_suggestion_set (id) ON DELETE RESTRICT,
        queued_at timestamptz NOT NULL,
        completed_by uuid NULL REFERENCES app_user (id) ON DELETE RESTRICT,
        completer_name text NULL,
        completed_at timestamptz NULL,
        updated_at timestamptz NOT NULL DEFAULT now(),
        CONSTRAINT coding_review_coded_has_completion CHECK ((status = 'coded') = (completed_at IS NOT NULL))
      )`);
    await db.query(`CREATE INDEX coding_review_queue_idx ON coding_review (queued_at, study_id) WHERE status <> 'coded'`);

    // A signed study's interventions are as frozen as its other rows, where that guard exists.
    await db.query(`
      DO $$ BEGIN
        IF EXISTS (SELECT 1 FROM pg_proc WHERE proname = 'study_part_refuse_signed_change') THEN
          CREATE TRIGGER coronary_intervention_signed_guard BEFORE INSERT OR UPDATE OR DELETE ON coronary_intervention
          FOR EACH ROW EXECUTE FUNCTION study_part_refuse_signed_change();
        END IF;
      END $$`);

    // Suggestions and decisions are evidence of what was proposed and decided: append-only.
    await db.query(`
      CREATE FUNCTION coding_refuse_change() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        RAISE EXCEPTION '% is append-only: % refused', TG_TABLE_NAME, TG_OP USING ERRCODE = 'insufficient_privilege';
      END $$`);
    for (const table of ['code_suggestion_set', 'code_line', 'code_decision']) {
      await db.query(`CREATE TRIGGER ${table}_no_update_delete BEFORE UPDATE OR DELETE ON ${table} FOR EACH ROW EXECUTE FUNCTION coding_refuse_change()`);
      await db.query(`CREATE TRIGGER ${table}_no_truncate BEFORE TRUNCATE ON ${table} FOR EACH STATEMENT EXECUTE FUNCTION coding_refuse_change()`);
    }
  }

  async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE coding_review`);
    await db.query(`DROP TABLE code_decision`);
    await db.query(`DROP TABLE code_line`);
    await db.query(`DROP TABLE code_suggestion_set`);
    await db.query(`DROP FUNCTION coding_refuse_change()`);
    await db.query(`DROP TABLE coronary_intervention`);
    await db.query(`
      ALTER TABLE study
        DROP COLUMN coding_patient_class, DROP COLUMN coding_billing, DROP COLUMN coding_setting, DROP COLUMN diagnostic_cath,
        DROP COLUMN cath_coronary_angiography, DROP COLUMN cath_left_heart, DROP COLUMN cath_left_ventriculography,
        DROP COLUMN cath_right_heart, DROP COLUMN cath_graft_angiography, DROP COLUMN coding_angina`);
  }
}
