import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * A signed version's PDF in a table of its own, `report_pdf`, one row per version, written in the
 * same transaction as the version. The signature stores the version (and everything that follows
 * from it) while the PDF is still rendering, then adds the PDF; reads of versions no longer carry
 * the PDF's bytes. Like the version, a PDF is never updated or deleted (trigger and privileges),
 * a constraint trigger checked at commit refuses a version without its PDF, and the stored SHA-256
 * must be that of the bytes. The bytes are
 * stored without compression (a PDF's streams are compressed already).
 */
export class ReportPdf1765430000000 implements MigrationInterface {
  name = 'ReportPdf1765430000000';

  async up(db: QueryRunner): Promise<void> {
    await db.query(`
      CREATE TABLE report_pdf (
        report_version_id uuid PRIMARY KEY REFERENCES report_version (id) ON DELETE RESTRICT,
        pdf bytea NOT NULL,
        pdf_sha256 char(64) NOT NULL CONSTRAINT report_pdf_sha_matches CHECK (pdf_sha256 = encode(sha256(pdf), 'hex'))
      )`);
    await db.query(`ALTER TABLE report_pdf ALTER COLUMN pdf SET STORAGE EXTERNAL`);
    await db.query(`INSERT INTO report_pdf (report_version_id, pdf, pdf_sha256) SELECT id, pdf, pdf_sha256 FROM report_version`);
    await db.query(`CREATE INDEX report_pdf_sha_idx ON report_pdf (pdf_sha256)`);
    await db.query(`DROP INDEX report_version_pdf_idx`);
    await db.query(`ALTER TABLE report_version DROP COLUMN pdf, DROP COLUMN pdf_sha256`);
    await db.query(`
      CREATE TRIGGER report_pdf_no_update_delete BEFORE UPDATE OR DELETE ON report_pdf
      FOR EACH ROW EXECUTE FUNCTION report_version_refuse_change()`);
    await db.query(`
      CREATE TRIGGER report_pdf_no_truncate BEFORE TRUNCATE ON report_pdf
      FOR EACH STATEMENT EXECUTE FUNCTION report_version_refuse_change()`);
    await db.query(`
      CREATE FUNCTION report_version_require_pdf() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        IF NOT EXISTS (SELECT 1 FROM report_pdf WHERE report_version_id = NEW.id) THEN
          RAISE EXCEPTION 'report version % has no PDF', NEW.id USING ERRCODE = 'integrity_constraint_violation';
        END IF;
        RETURN NULL;
      END $$`);
    await db.query(`
      CREATE CONSTRAINT TRIGGER report_version_has_pdf AFTER INSERT ON report_version
      DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION report_version_require_pdf()`);
  }

  async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TRIGGER report_version_has_pdf ON report_version`);
    await db.query(`DROP FUNCTION report_version_require_pdf()`);
    await db.query(`ALTER TABLE report_version ADD COLUMN pdf bytea NULL, ADD COLUMN pdf_sha256 char(64) NULL`);
    await db.query(`ALTER TABLE report_version DISABLE TRIGGER report_version_no_update_delete`);
    await db.query(`UPDATE report_version v SET pdf = p.pdf, pdf_sha256 = p.pdf_sha256 FROM report_pdf p WHERE p.report_version_id = v.id`);
    await db.query(`ALTER TABLE report_version ENABLE TRIGGER report_version_no_update_delete`);
    await db.query(`ALTER TABLE report_version ALTER COLUMN pdf SET NOT NULL, ALTER COLUMN pdf_sha256 SET NOT NULL`);
    await db.query(`CREATE INDEX report_version_pdf_idx ON report_version (pdf_sha256)`);
    await db.query(`DROP TABLE report_pdf`);
  }
}
