import type { MigrationInterface, QueryRunner } from 'typeorm';

/**
 * Sessions (the table connect-pg-simple reads) and the append-only audit trail.
 * The database itself refuses UPDATE, DELETE and TRUNCATE on audit_event.
 */
export class SessionsAndAudit1764720000000 implements MigrationInterface {
  name = 'SessionsAndAudit1764720000000';

  async up(db: QueryRunner): Promise<void> {
    await db.query(`
      CREATE TABLE http_session (
        sid varchar NOT NULL PRIMARY KEY,
        sess json NOT NULL,
        expire timestamptz NOT NULL
      )`);
    await db.query(`CREATE INDEX http_session_expire_idx ON http_session (expire)`);

    await db.query(`
      CREATE TABLE audit_event (
        id bigint GENERATED ALWAYS AS IDENTITY PRIMARY KEY,
        recorded_at timestamptz NOT NULL DEFAULT now(),
        actor_user_id uuid NULL,
        actor_name text NULL,
        actor_role text NULL,
        action text NOT NULL,
        entity_type text NULL,
        entity_id text NULL,
        client_address text NULL,
        outcome text NOT NULL CHECK (outcome IN ('success', 'failure', 'denied')),
        detail jsonb NULL
      )`);
    await db.query(`CREATE INDEX audit_event_recorded_idx ON audit_event (recorded_at DESC)`);
    await db.query(`CREATE INDEX audit_event_entity_idx ON audit_event (entity_type, entity_id)`);
    await db.query(`
      CREATE FUNCTION audit_event_refuse_change() RETURNS trigger LANGUAGE plpgsql AS $$
      BEGIN
        RAISE EXCEPTION 'audit_event is append-only: % refused', TG_OP USING ERRCODE = 'insufficient_privilege';
      END $$`);
    await db.query(`
      CREATE TRIGGER audit_event_no_update_delete BEFORE UPDATE OR DELETE ON audit_event
      FOR EACH ROW EXECUTE FUNCTION audit_event_refuse_change()`);
    await db.query(`
      CREATE TRIGGER audit_event_no_truncate BEFORE TRUNCATE ON audit_event
      FOR EACH STATEMENT EXECUTE FUNCTION audit_event_refuse_change()`);
  }

  async down(db: QueryRunner): Promise<void> {
    await db.query(`DROP TABLE audit_event`);
    await db.query(`DROP FUNCTION audit_event_refuse_change()`);
    await db.query(`DROP TABLE http_session`);
  }
}
