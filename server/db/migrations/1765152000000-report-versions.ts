import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Signed reports. Each signature stores an immutable report version: the narrative, the structured
 * snapshot and analysis it was built from, the thresholds and template used, the PDF and its hashes,
 * who signed and when. Versions are never updated or deleted (a trigger refuses it); an addendum adds
 * a version that points to the one it supersedes. A study may now be 'amending' (an addendum open).
 */
export class ReportVersions1765152000000 implements MigrationInterface {
  name = 'ReportVersions1765152000000';

  async up(db: QueryRunner): Promise<void> {
    await db.query(`ALTER TABLE study DROP CONSTRAINT IF EXISTS study_state_check`);
    await db.query(`ALTER TABLE study ADD CONSTRAINT study_state_check CHECK (state IN ('draft', 'awaiting-signature', 'signed', 'amending', 'amended'))`);
    await db.query(`
      CREATE TABLE report_version (
        id uuid PRIMARY KEY DEFAULT gen_random_uuid(),
        study_id uuid NOT NULL REFERENCES study (id) ON DELETE RESTRICT,
        version_no integer NOT NULL CHECK (version_no >= 1),
        study_version integer NOT NULL,
        status text NOT NULL CHECK (status IN ('final', 'amended')),
        supersedes_id uuid NULL REFERENCES report_version (id) ON DELETE RESTRICT,
        reason text NULL,
        narrative_html text NOT NULL,
        narrative_text text NOT NULL,
        snapshot jsonb NOT NULL,
        analysis jsonb NOT NULL,
        thresholds jsonb NOT NULL,
        template_version text NOT NULL,
        pdf bytea NOT NULL,
        pdf_sha256 char(64) NOT NULL,
        content_sha256 char(64) NOT NULL,
        signed_by uuid NOT NULL REFERENCES app_user (id) ON DELETE RESTRICT,
        signer_name text NOT NULL,
        signed_at timestamptz NOT NULL,
        attestation text NOT NULL,
        CONSTRAINT report_version_number_key UNIQUE (study_id, version_no),
        CONSTRAINT report_version_amended_has_previous CHECK ((status = 'final') = (supersedes_id IS NULL))
      )`);
    await db.query(`CREATE INDEX report_version_content_idx ON report_version (content_sha256)`);
    await db.query(`CREATE INDEX report_version_pdf_idx ON report_version (pdf_sha256)`);
    await db.query(`
      CREATE FUNCTION report_version_refuse_change() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        RAISE EXCEPTION 'report_version is append-only: % refused', TG_OP USING ERRCODE = 'insufficient_privilege';
      END $$`);
    await db.query(`
      CREATE TRIGGER report_version_no_update_delete BEFORE UPDATE OR DELETE ON report_version
      FOR EACH ROW EXECUTE FUNCTION report_version_refuse_change()`);
    await db.query(`
      CREATE TRIGGER report_version_no_truncate BEFORE TRUNCATE ON report_version
      FOR EACH STATEMENT EXECUTE FUNCTION report_version_refuse_change()`);
  }

  async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE report_version`);
    await db.query(`DROP FUNCTION report_version_refuse_change()`);
    await db.query(`ALTER TABLE study DROP CONSTRAINT IF EXISTS study_state_check`);
    await db.query(`ALTER TABLE study ADD CONSTRAINT study_state_check CHECK (state IN ('draft', 'awaiting-signature', 'signed', 'amended'))`);
  }
}
