import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * A signed study's record cannot change, whoever asks: the study row and its measurement and
 * attachment rows are guarded by triggers, not only by the server's checks. A signed (or amended)
 * study may only be opened for an addendum (state 'amending', nothing else changed); while it is
 * 'amending' its record may change again. SQLSTATE 55000 (object not in prerequisite state).
 */
export class SignedStudyGuard1765131313000 implements MigrationInterface {
  name = 'SignedStudyGuard1765131313000';

  async up(db: QueryRunner): Promise<void> {
    await db.query(`
      CREATE FUNCTION study_record_is_locked(state text) RETURNS boolean LANGUAGE sql IMMUTABLE AS $$
        SELECT state IN ('signed', 'amended')
      $$`);
    await db.query(`
      CREATE FUNCTION study_refuse_signed_change() RETURNS trigger LANGUAGE plpgsql AS $$
      DECLARE
        -- sort_at is generated: not yet computed in NEW while a BEFORE trigger runs.
        bookkeeping constant text[] := ARRAY['state', 'version', 'updated_at', 'sort_at'];
      BEGIN
        IF NOT study_record_is_locked(OLD.state) THEN
          RETURN CASE WHEN TG_OP = 'DELETE' THEN OLD ELSE NEW END;
        END IF;
        IF TG_OP = 'UPDATE' AND NEW.state = 'amending' AND (to_jsonb(NEW) - bookkeeping) = (to_jsonb(OLD) - bookkeeping) THEN
          RETURN NEW;
        END IF;
        RAISE EXCEPTION 'study % is %: its record cannot change except through an addendum', OLD.id, OLD.state
          USING ERRCODE = 'object_not_in_prerequisite_state';
      END $$`);
    await db.query(`
      CREATE TRIGGER study_signed_guard BEFORE UPDATE OR DELETE ON study
      FOR EACH ROW EXECUTE FUNCTION study_refuse_signed_change()`);

    // Rows that belong to a study: refused when the study they belong to (before or after) is locked.
    await db.query(`
      CREATE FUNCTION study_part_refuse_signed_change() RETURNS trigger LANGUAGE plpgsql AS $$
      DECLARE
        ids uuid[] := ARRAY[]::uuid[];
        locked_id uuid;
      BEGIN
        IF TG_TABLE_NAME = 'thermodilution_injection' THEN
          IF TG_OP <> 'INSERT' THEN ids := ids || (SELECT study_id FROM vessel_assessment WHERE id = OLD.vessel_assessment_id); END IF;
          IF TG_OP <> 'DELETE' THEN ids := ids || (SELECT study_id FROM vessel_assessment WHERE id = NEW.vessel_assessment_id); END IF;
        ELSE
          IF TG_OP <> 'INSERT' THEN ids := ids || OLD.study_id; END IF;
          IF TG_OP <> 'DELETE' THEN ids := ids || NEW.study_id; END IF;
        END IF;
        SELECT s.id INTO locked_id FROM study s WHERE s.id = ANY(ids) AND study_record_is_locked(s.state) LIMIT 1;
        IF locked_id IS NOT NULL THEN
          RAISE EXCEPTION '% of study %: a signed record cannot change except through an addendum', TG_TABLE_NAME, locked_id
            USING ERRCODE = 'object_not_in_prerequisite_state';
        END IF;
        RETURN CASE WHEN TG_OP = 'DELETE' THEN OLD ELSE NEW END;
      END $$`);
    for (const table of ['vessel_assessment', 'thermodilution_injection', 'acetylcholine_dose', 'attachment']) {
      await db.query(`
        CREATE TRIGGER ${table}_signed_guard BEFORE INSERT OR UPDATE OR DELETE ON ${table}
        FOR EACH ROW EXECUTE FUNCTION study_part_refuse_signed_change()`);
    }
  }

  async down(db: QueryRunner): Promise<void> {
    for (const table of ['vessel_assessment', 'thermodilution_injection', 'acetylcholine_dose', 'attachment']) {
      await db.query(`DROP TRIGGER ${table}_signed_guard ON ${table}`);
    }
    await db.query(`DROP TRIGGER study_signed_guard ON study`);
    await db.query(`DROP FUNCTION study_part_refuse_signed_change()`);
    await db.query(`DROP FUNCTION study_refuse_signed_change()`);
    await db.query(`DROP FUNCTION study_record_is_locked(text)`);
  }
}
