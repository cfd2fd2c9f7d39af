import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { recordAudit } from '../../server/audit/audit';
import { openOwnerDatabase, openTestDatabase } from '../support/app';
import { createStudy } from '../support/factories';

// The server connects as a role that may only read and write rows: whatever a flaw in the server
// let an attacker run, these statements stay refused by PostgreSQL itself (SQLSTATE 42501
// insufficient_privilege, or 55000 from the signed-study guard). PostgreSQL 15 docs §5.7 (privileges).

let server: DataSource;
let owner: DataSource;

beforeAll(async () => {
  server = await openTestDatabase();
  owner = await openOwnerDatabase();
});
afterAll(async () => {
  await server.destroy();
  await owner.destroy();
});

const refused = async (db: DataSource, sql: string, params: unknown[] = []) => {
  const error = await db.query(sql, params).then(
    () => null,
    (e: { code?: string; message?: string }) => e,
  );
  expect(error, `expected refusal of: ${sql}`).not.toBeNull();
  return error!;
};

describe("the server's database role", () => {
  it('is not the owner and not a superuser', async () => {
    const [me] = await server.query(`SELECT current_user AS name, rolsuper, rolcreaterole, rolcreatedb FROM pg_roles WHERE rolname = current_user`);
    expect(me).toMatchObject({ name: 'isobar', rolsuper: false, rolcreaterole: false, rolcreatedb: false });
    const [{ owners }] = await server.query(`SELECT array_agg(DISTINCT tableowner)::text[] AS owners FROM pg_tables WHERE schemaname = 'public'`);
    expect(owners).toEqual(['isobar_owner']);
  });

  it.each([
    ['UPDATE of the audit trail', `UPDATE audit_event SET outcome = 'success'`],
    ['DELETE from the audit trail', `DELETE FROM audit_event`],
    ['TRUNCATE of the audit trail', `TRUNCATE audit_event`],
    ['a back-dated audit entry', `INSERT INTO audit_event (recorded_at, action, outcome) VALUES ('2020-01-01', 'read', 'success')`],
    ['an audit entry with a chosen id', `INSERT INTO audit_event (id, action, outcome) OVERRIDING SYSTEM VALUE VALUES (1, 'read', 'success')`],
    ['disabling the audit trigger', `ALTER TABLE audit_event DISABLE TRIGGER audit_event_no_update_delete`],
    ['dropping the audit trail', `DROP TABLE audit_event`],
    ['UPDATE of a signed report version', `UPDATE report_version SET signer_name = 'someone else'`],
    ['DELETE of a signed report version', `DELETE FROM report_version`],
    ['UPDATE of a signed PDF', `UPDATE report_pdf SET pdf = '\\x00'`],
    ['DELETE of a signed PDF', `DELETE FROM report_pdf`],
    ['TRUNCATE of the signed PDFs', `TRUNCATE report_pdf`],
    ['UPDATE of a code suggestion', `UPDATE code_line SET code = '99999'`],
    ['DELETE of a coder decision', `DELETE FROM code_decision`],
    ['UPDATE of a suggestion set', `UPDATE code_suggestion_set SET caution = ''`],
    ['dropping the signed-study guard', `DROP TRIGGER study_signed_guard ON study`],
    ['replacing a guard function', `CREATE OR REPLACE FUNCTION study_record_is_locked(state text) RETURNS boolean LANGUAGE sql AS $$ SELECT false $$`],
    ['creating a table', `CREATE TABLE stolen (x text)`],
    ['creating a temporary table', `CREATE TEMPORARY TABLE scratch (x text)`],
    ['adding a column', `ALTER TABLE study ADD COLUMN note text`],
    ['changing the migration ledger', `DELETE FROM schema_migration`],
    ['creating a schema', `CREATE SCHEMA elsewhere`],
    ['changing the job queue schema', `ALTER TABLE graphile_worker._private_jobs ADD COLUMN x int`],
    ['changing the job queue ledger', `DELETE FROM graphile_worker.migrations`],
  ])('refuses %s', async (_what, sql) => {
    const error = await refused(server, sql);
    expect(error.code).toMatch(/^(42501|42P01|0LP01)$/);
  });

  it('cannot grant itself more (PostgreSQL grants nothing and warns)', async () => {
    await server.query(`GRANT UPDATE, DELETE ON audit_event TO isobar`).catch(() => undefined);
    const [row] = await server.query(`SELECT has_table_privilege('isobar', 'audit_event', 'UPDATE') AS up, has_table_privilege('isobar', 'audit_event', 'DELETE') AS del`);
    expect(row).toEqual({ up: false, del: false });
  });

  it('may still append to the audit trail and work rows', async () => {
    await recordAudit(server, { action: 'read', outcome: 'success', entityType: 'study', entityId: 'privilege-check' });
    const [row] = await server.query(`SELECT recorded_at FROM audit_event WHERE entity_id = 'privilege-check' ORDER BY id DESC LIMIT 1`);
    expect(Math.abs(new Date(row.recorded_at).getTime() - Date.now())).toBeLessThan(60_000);
    const study = await createStudy(server);
    await server.query(`UPDATE study SET indication = 'check' WHERE id = $1`, [study.id]);
    await server.query(`SELECT graphile_worker.add_job('privilege-check', '{}'::json, max_attempts := 1)`);
    await server.query(`DELETE FROM graphile_worker._private_jobs WHERE task_id = (SELECT id FROM graphile_worker._private_tasks WHERE identifier = 'privilege-check')`);
  });
});

describe("a signed study's record", () => {
  async function signedStudyWithVessel(db: DataSource) {
    const study = await createStudy(db);
    const vesselId = crypto.randomUUID();
    await db.query(`INSERT INTO vessel_assessment (id, study_id, position, vessel) VALUES ($1, $2, 0, 'LAD')`, [vesselId, study.id]);
    await db.query(`INSERT INTO thermodilution_injection (vessel_assessment_id, phase, position, transit_s) VALUES ($1, 'rest', 0, 0.8)`, [vesselId]);
    await db.query(`UPDATE study SET state = 'signed' WHERE id = $1`, [study.id]);
    return { ...study, vesselId };
  }

  for (const [who, pick] of [
    ['server role', () => server],
    ['owner role', () => owner],
  ] as const) {
    it(`cannot change, for the ${who}: study row, state, measurements, deletion`, async () => {
      const db = pick();
      const s = await signedStudyWithVessel(server);
      for (const [sql, params] of [
        [`UPDATE study SET indication = 'rewritten' WHERE id = $1`, [s.id]],
        [`UPDATE study SET state = 'draft' WHERE id = $1`, [s.id]],
        [`DELETE FROM study WHERE id = $1`, [s.id]],
        [`UPDATE vessel_assessment SET rest_pa = 90 WHERE id = $1`, [s.vesselId]],
        [`DELETE FROM vessel_assessment WHERE id = $1`, [s.vesselId]],
        [`INSERT INTO vessel_assessment (id, study_id, position, vessel) VALUES (gen_random_uuid(), $1, 1, 'RCA')`, [s.id]],
        [`UPDATE thermodilution_injection SET transit_s = 0.1 WHERE vessel_assessment_id = $1`, [s.vesselId]],
        [`INSERT INTO acetylcholine_dose (id, study_id, position, vessel, micrograms) VALUES (gen_random_uuid(), $1, 0, 'LAD', 20)`, [s.id]],
      ] as const) {
        const error = await refused(db, sql, [...params]);
        expect(error.code, sql).toBe('55000');
      }
      const [row] = await server.query(`SELECT state, indication FROM study WHERE id = $1`, [s.id]);
      expect(row).toEqual({ state: 'signed', indication: null });
    });
  }

  it('leaves a draft free to change', async () => {
    const study = await createStudy(server);
    await server.query(`INSERT INTO acetylcholine_dose (id, study_id, position, vessel, micrograms) VALUES (gen_random_uuid(), $1, 0, 'LAD', 20)`, [study.id]);
    await server.query(`UPDATE study SET indication = 'fine' WHERE id = $1`, [study.id]);
    await server.query(`DELETE FROM acetylcholine_dose WHERE study_id = $1`, [study.id]);
  });
});
