import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Worklist search by MRN in any case and by its first or last digits: prefix indexes on the MRN in
 * capitals and on the same reversed (a suffix search is a prefix search of the reversed text).
 */
export class PatientMrnSearch1765100000000 implements MigrationInterface {
  name = 'PatientMrnSearch1765100000000';

  async up(db: QueryRunner): Promise<void> {
    await db.query(`CREATE INDEX patient_mrn_upper_idx ON patient (upper(mrn) text_pattern_ops)`);
    await db.query(`CREATE INDEX patient_mrn_reverse_idx ON patient (reverse(upper(mrn)) text_pattern_ops)`);
  }

  async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP INDEX patient_mrn_reverse_idx`);
    await db.query(`DROP INDEX patient_mrn_upper_idx`);
  }
}
