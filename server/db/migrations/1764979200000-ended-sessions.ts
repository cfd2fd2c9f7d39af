import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Ids of sessions that have ended (sign-out, rotation at sign-in). A save still in flight for such an
 * id must not bring the session back; rows are pruned once no session could outlive them.
 */
export class EndedSessions1764979200000 implements MigrationInterface {
  name = 'EndedSessions1764979200000';

  async up(db: QueryRunner): Promise<void> {
    await db.query(`CREATE TABLE http_session_ended (sid varchar PRIMARY KEY, ended_at timestamptz NOT NULL DEFAULT now())`);
    await db.query(`CREATE INDEX http_session_ended_at_idx ON http_session_ended (ended_at)`);
  }

  async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE http_session_ended`);
  }
}
