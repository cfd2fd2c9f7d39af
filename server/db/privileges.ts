import type { DataSource } from 'typeorm';

/**
 * Two roles: the owner (owns the schema, runs migrations, as `MIGRATION_DATABASE_URL`) and the
 * server's role (`DATABASE_URL`), which may only read and write rows, and only the rows it needs:
 * - no DDL: it owns nothing and may not create in any schema (nor temporary tables);
 * - the audit trail is append-only: SELECT, and INSERT of every column but `id` and `recorded_at`
 *   (so an entry cannot be back-dated); no UPDATE, DELETE or TRUNCATE;
 * - code suggestions and decisions may be added, never changed or removed;
 * - the migration ledgers are read-only (the server checks that no migration is pending);
 * - the job queue's tables and functions, to enqueue and to work jobs, but not its schema.
 * Applied by the owner after every migration run (GRANT and REVOKE are idempotent), so tables
 * added by later migrations get the same treatment; append-only tables are listed here.
 */
const appendOnlyTables: Record<string, string[]> = {
  audit_event: ['actor_user_id', 'actor_name', 'actor_role', 'action', 'entity_type', 'entity_id', 'client_address', 'outcome', 'detail'],
  // Signed report versions: written once by the signature, never changed (a trigger refuses it too).
  report_version: [
    'id', 'study_id', 'version_no', 'study_version', 'status', 'supersedes_id', 'reason', 'narrative_html', 'narrative_text',
    'snapshot', 'analysis', 'thresholds', 'template_version', 'content_sha256', 'signed_by',
    'signer_name', 'signed_at', 'attestation', 'thresholds_basis', 'threshold_set_id',
  ],
  // A signed version's PDF, written with the version.
  report_pdf: ['report_version_id', 'pdf', 'pdf_sha256'],
  // Threshold sets: a change is a new set with its effective date; the sets that judged signed
  // reports stay as they were (created_at is the database's clock, so a set cannot be back-dated).
  threshold_set: ['effective_from', '"values"', 'note', 'created_by'],
};
// Code suggestions and the coder's decisions: added, never changed (a trigger refuses it too).
const insertOnlyTables = ['code_suggestion_set', 'code_line', 'code_decision'];
const readOnlyTables = ['schema_migration'];
const jobSchema = 'graphile_worker';

const ident = (name: string) => {
  if (!/^[a-z_][a-z0-9_]*$/.test(name)) throw new Error(`Not a plain role name: ${name}`);
  return `"${name}"`;
};

export async function applyServerPrivileges(owner: DataSource, serverRole: string): Promise<void> {
  const role = ident(serverRole);
  const [{ db, me }] = await owner.query(`SELECT current_database() AS db, current_user AS me`);
  if (me === serverRole) throw new Error('The server role and the owner role are the same: use two roles (see DEVELOPERS.md).');
  await owner.transaction(async (tx) => {
    await tx.query(`REVOKE ALL ON DATABASE "${db}" FROM PUBLIC`);
    await tx.query(`GRANT CONNECT ON DATABASE "${db}" TO ${role}`);
    await tx.query(`REVOKE CREATE ON SCHEMA public FROM PUBLIC`);
    await tx.query(`REVOKE ALL ON SCHEMA public FROM ${role}`);
    await tx.query(`GRANT USAGE ON SCHEMA public TO ${role}`);
    await tx.query(`REVOKE ALL ON ALL TABLES IN SCHEMA public FROM ${role}`);
    await tx.query(`GRANT SELECT, INSERT, UPDATE, DELETE ON ALL TABLES IN SCHEMA public TO ${role}`);
    for (const [table, columns] of Object.entries(appendOnlyTables)) {
      await tx.query(`REVOKE ALL ON ${table} FROM ${role}`);
      await tx.query(`GRANT SELECT ON ${table} TO ${role}`);
      await tx.query(`GRANT INSERT (${columns.join(', ')}) ON ${table} TO ${role}`);
    }
    for (const table of insertOnlyTables) {
      await tx.query(`REVOKE ALL ON ${table} FROM ${role}`);
      await tx.query(`GRANT SELECT, INSERT ON ${table} TO ${role}`);
    }
    for (const table of readOnlyTables) {
      await tx.query(`REVOKE ALL ON ${table} FROM ${role}`);
      await tx.query(`GRANT SELECT ON ${table} TO ${role}`);
    }
    await tx.query(`REVOKE ALL ON ALL SEQUENCES IN SCHEMA public FROM ${role}`);
    await tx.query(`GRANT USAGE, SELECT ON ALL SEQUENCES IN SCHEMA public TO ${role}`);
    const [queue] = await tx.query(`SELECT 1 FROM pg_namespace WHERE nspname = $1`, [jobSchema]);
    if (queue) {
      await tx.query(`REVOKE ALL ON SCHEMA ${jobSchema} FROM ${role}`);
      await tx.query(`GRANT USAGE ON SCHEMA ${jobSchema} TO ${role}`);
      await tx.query(`GRANT SELECT, INSERT, UPDATE, DELETE ON ALL TABLES IN SCHEMA ${jobSchema} TO ${role}`);
      await tx.query(`REVOKE INSERT, UPDATE, DELETE ON ${jobSchema}.migrations FROM ${role}`);
      await tx.query(`GRANT USAGE, SELECT, UPDATE ON ALL SEQUENCES IN SCHEMA ${jobSchema} TO ${role}`);
      await tx.query(`GRANT EXECUTE ON ALL FUNCTIONS IN SCHEMA ${jobSchema} TO ${role}`);
      // The queue's private tables have row-level security with no policy (only their owner sees
      // rows): let the server's role work every row of them, as the owner would.
      const guarded: { name: string }[] = await tx.query(
        `SELECT c.relname AS name FROM pg_class c JOIN pg_namespace n ON n.oid = c.relnamespace
         WHERE n.nspname = $1 AND c.relkind = 'r' AND c.relrowsecurity`,
        [jobSchema],
      );
      for (const { name } of guarded) {
        const table = `${jobSchema}.${ident(name)}`;
        await tx.query(`DROP POLICY IF EXISTS server_role_rows ON ${table}`);
        await tx.query(`CREATE POLICY server_role_rows ON ${table} FOR ALL TO ${role} USING (true) WITH CHECK (true)`);
      }
    }
  });
}

/** The role name in a postgres:// URL. */
export const roleOf = (url: string) => decodeURIComponent(new URL(url).username);
