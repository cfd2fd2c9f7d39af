import type { MigrationInterface, QueryRunner } from 'typeorm';

const UUID = `'^[0-9a-fA-F]{8}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{4}-[0-9a-fA-F]{12}$'`;

/**
 * Audit trail search: newest first over (recorded_at, id), by date range, by user, by study or
 * patient and by action, each the first page read straight from an index.
 * - `study_id`: the study an event is about, stored once when the event is written: the entity id of
 *   an event on a study (or its coding or code suggestions), else the `studyId` in its detail (an
 *   attachment). A uuid, so the trail joins study and patient through their primary keys.
 * - one (key, recorded_at, id) index per way of searching, and one of the unsuccessful events alone;
 *   `(recorded_at, id) < cursor` pages on.
 */
export class AuditSearch1765410000000 implements MigrationInterface {
  name = 'AuditSearch1765410000000';

  async up(db: QueryRunner): Promise<void> {
    await db.query(`
      ALTER TABLE audit_event ADD COLUMN study_id uuid GENERATED ALWAYS AS (
        CASE
          WHEN entity_type IN ('study', 'study-coding', 'code-suggestions') AND entity_id ~ ${UUID} THEN entity_id::uuid
          WHEN detail->>'studyId' ~ ${UUID} THEN (detail->>'studyId')::uuid
        END
      ) STORED`);
    await db.query(`DROP INDEX audit_event_recorded_idx`);
    await db.query(`CREATE INDEX audit_event_at_idx ON audit_event (recorded_at DESC, id DESC)`);
    await db.query(`CREATE INDEX audit_event_actor_at_idx ON audit_event (actor_user_id, recorded_at DESC, id DESC) WHERE actor_user_id IS NOT NULL`);
    await db.query(`CREATE INDEX audit_event_study_at_idx ON audit_event (study_id, recorded_at DESC, id DESC) WHERE study_id IS NOT NULL`);
    await db.query(`CREATE INDEX audit_event_action_at_idx ON audit_event (action, recorded_at DESC, id DESC)`);
    // Failed and refused events are few among many: their own small index.
    await db.query(`CREATE INDEX audit_event_unsuccessful_at_idx ON audit_event (recorded_at DESC, id DESC) WHERE outcome <> 'success'`);
  }

  async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP INDEX audit_event_unsuccessful_at_idx`);
    await db.query(`DROP INDEX audit_event_action_at_idx`);
    await db.query(`DROP INDEX audit_event_study_at_idx`);
    await db.query(`DROP INDEX audit_event_actor_at_idx`);
    await db.query(`DROP INDEX audit_event_at_idx`);
    await db.query(`CREATE INDEX audit_event_recorded_idx ON audit_event (recorded_at DESC)`);
    await db.query(`ALTER TABLE audit_event DROP COLUMN study_id`);
  }
}
