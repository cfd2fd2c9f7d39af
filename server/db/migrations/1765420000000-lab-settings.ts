import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * The lab's settings and the provenance of a signed report's thresholds.
 * - `lab_settings`: one row (id 1) of typed settings the admin changes; a NULL EHR endpoint or mail
 *   sender means the server's configuration applies. `version` guards concurrent edits.
 * - `threshold_set` may not be back-dated: a set takes effect no earlier than when it was written
 *   (one minute's grace for clocks), so a signed report's judgement is never rewritten. The server's
 *   role may only add sets (server/db/privileges.ts). Existing rows are left as they are.
 * - `report_version` records which thresholds judged it: the set in force at signing (`in-force`),
 *   or for an addendum the original report's (`original`) or those in force at the addendum (`current`).
 */
export class LabSettings1765420000000 implements MigrationInterface {
  name = 'LabSettings1765420000000';

  async up(db: QueryRunner): Promise<void> {
    await db.query(`
      CREATE TABLE lab_settings (
        id smallint PRIMARY KEY DEFAULT 1 CONSTRAINT lab_settings_one_row CHECK (id = 1),
        time_zone text NOT NULL DEFAULT 'UTC',
        signature_target_hours numeric(5, 1) NOT NULL DEFAULT 24 CHECK (signature_target_hours >= 1 AND signature_target_hours <= 168),
        ehr_base_url text NULL,
        mail_from text NULL,
        template_version text NOT NULL DEFAULT 'v1' CHECK (template_version ~ '^v[0-9]{1,4}$'),
        version integer NOT NULL DEFAULT 1,
        updated_at timestamptz NULL,
        updated_by uuid NULL REFERENCES app_user (id) ON DELETE SET NULL
      )`);
    await db.query(`INSERT INTO lab_settings (id) VALUES (1) ON CONFLICT DO NOTHING`);
    await db.query(`ALTER TABLE threshold_set ADD CONSTRAINT threshold_set_not_backdated CHECK (effective_from >= created_at - interval '1 minute') NOT VALID`);
    await db.query(`ALTER TABLE report_version ADD COLUMN thresholds_basis text NULL CHECK (thresholds_basis IN ('in-force', 'original', 'current'))`);
    await db.query(`ALTER TABLE report_version ADD COLUMN threshold_set_id integer NULL REFERENCES threshold_set (id) ON DELETE RESTRICT`);
  }

  async down(db: QueryRunner): Promise<void> {
    await db.query(`ALTER TABLE report_version DROP COLUMN threshold_set_id`);
    await db.query(`ALTER TABLE report_version DROP COLUMN thresholds_basis`);
    await db.query(`ALTER TABLE threshold_set DROP CONSTRAINT threshold_set_not_backdated`);
    await db.query(`DROP TABLE lab_settings`);
  }
}
