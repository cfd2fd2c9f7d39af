import type { MigrationInterface, QueryRunner } from 'typeorm';

/** Worklist search by given-name prefix, beside the family-name index of the study-record migration. */
export class PatientNameSearch1764892800000 implements MigrationInterface {
  name = 'PatientNameSearch1764892800000';

  async up(db: QueryRunner): Promise<void> {
    await db.query(`CREATE INDEX patient_given_name_idx ON patient (lower(given_name) text_pattern_ops)`);
  }

  async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP INDEX patient_given_name_idx`);
  }
}
