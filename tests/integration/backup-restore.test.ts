import { execFileSync } from 'node:child_process';
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { prepareDatabase } from '../../server/cli/prepare-database';
import { createDataSource } from '../../server/db/data-source';
import { diskStorage } from '../../server/attachments/storage';
import { createStudy } from '../support/factories';

// npm run db:backup / db:restore: back up, destroy the database and the attachment folder,
// restore, and find every study, its version, its measurements and every attachment's bytes again.

const port = new URL(process.env.DATABASE_URL!).port;
const dbName = 'isobar_backup_check';
const serverUrl = `postgres://isobar@127.0.0.1:${port}/${dbName}`;
const ownerUrl = `postgres://isobar_owner@127.0.0.1:${port}/${dbName}`;
const attachmentDir = path.resolve('.data/backup-check-attachments');
const archive = path.join(os.tmpdir(), `isobar-backup-${process.pid}.tar`);
const pgBin = `/usr/lib/postgresql/${fs.readdirSync('/usr/lib/postgresql').sort((a, b) => Number(a) - Number(b)).pop()}/bin`;
const psql = (sql: string) => execFileSync(`${pgBin}/psql`, ['-h', '127.0.0.1', '-p', port, '-U', 'postgres', '-d', 'postgres', '-v', 'ON_ERROR_STOP=1', '-qtAc', sql]).toString().trim();
const env = { ...process.env, ISOBAR_PG_PORT: port, ISOBAR_DB_NAME: dbName, ATTACHMENT_DIR: attachmentDir, DATABASE_URL: serverUrl, MIGRATION_DATABASE_URL: ownerUrl };
const run = (script: string) => execFileSync('bash', [script, archive], { env, stdio: ['ignore', 'pipe', 'pipe'] }).toString();
const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex');

let db: DataSource;
beforeAll(async () => {
  psql(`DROP DATABASE IF EXISTS ${dbName} WITH (FORCE)`);
  psql(`CREATE DATABASE ${dbName} OWNER isobar_owner`);
  await prepareDatabase(ownerUrl, serverUrl);
  fs.rmSync(attachmentDir, { recursive: true, force: true });
  db = createDataSource(serverUrl, 2);
  await db.initialize();
}, 60_000);
afterAll(async () => {
  await db?.destroy().catch(() => undefined);
  psql(`DROP DATABASE IF EXISTS ${dbName} WITH (FORCE)`);
  fs.rmSync(attachmentDir, { recursive: true, force: true });
  for (const f of fs.readdirSync(path.dirname(attachmentDir)).filter((f) => f.startsWith('backup-check-attachments.before-restore'))) {
    fs.rmSync(path.join(path.dirname(attachmentDir), f), { recursive: true, force: true });
  }
  fs.rmSync(archive, { force: true });
});

describe('backup and restore', () => {
  it('brings back every study, version, measurement and attachment after the database and files are lost', async () => {
    const storage = diskStorage(attachmentDir);
    const studies = [await createStudy(db), await createStudy(db), await createStudy(db)];
    await db.query(`UPDATE study SET version = 4, indication = 'before the disk failed' WHERE id = $1`, [studies[0].id]);
    await db.query(`INSERT INTO vessel_assessment (id, study_id, position, vessel, rest_pa, rest_pd) VALUES (gen_random_uuid(), $1, 0, 'LAD', 92, 85)`, [studies[1].id]);
    const files = [Buffer.from('%PDF-1.4\n% printout\n%%EOF\n'), Buffer.from('time,pd\n0.01,81.5\n')];
    const attachments: Array<{ id: string; sha256: string }> = [];
    for (const [i, bytes] of files.entries()) {
      const stored = await storage.put(bytes);
      const [row] = await db.query(
        `INSERT INTO attachment (study_id, file_name, media_type, size_bytes, sha256, storage_key) VALUES ($1, $2, $3, $4, $5, $6) RETURNING id`,
        [studies[i].id, `f${i}`, i ? 'text/csv' : 'application/pdf', bytes.length, stored.sha256, stored.key],
      );
      attachments.push({ id: row.id, sha256: stored.sha256 });
    }
    await db.query(`UPDATE study SET state = 'signed' WHERE id = $1`, [studies[1].id]);
    const snapshot = async (d: DataSource) =>
      d.query(
        `SELECT s.id, s.version, s.state, s.indication, count(v.id)::int AS vessels
         FROM study s LEFT JOIN vessel_assessment v ON v.study_id = s.id GROUP BY s.id ORDER BY s.id`,
      );
    const before = await snapshot(db);
    const auditBefore = (await db.query(`SELECT count(*)::int AS n FROM audit_event`))[0].n;
    await db.destroy();

    expect(run('scripts/db-backup.sh')).toMatch(/backup written/);
    psql(`DROP DATABASE ${dbName} WITH (FORCE)`);
    fs.rmSync(attachmentDir, { recursive: true, force: true });
    expect(run('scripts/db-restore.sh')).toMatch(/restored/);

    db = createDataSource(serverUrl, 2);
    await db.initialize();
    expect(await snapshot(db)).toEqual(before);
    expect((await db.query(`SELECT count(*)::int AS n FROM audit_event`))[0].n).toBe(auditBefore);
    for (const a of attachments) {
      const [row] = await db.query(`SELECT sha256, storage_key FROM attachment WHERE id = $1`, [a.id]);
      expect(row.sha256).toBe(a.sha256);
      expect(sha256(await storage.get(row.storage_key))).toBe(a.sha256);
    }
    // The restored database keeps the split of roles: the server's role still cannot rewrite the audit trail.
    await expect(db.query(`DELETE FROM audit_event`)).rejects.toThrow(/permission denied/);
    // …and the signed study is still guarded.
    await expect(db.query(`UPDATE study SET indication = 'x' WHERE id = $1`, [studies[1].id])).rejects.toThrow(/addendum/);
  }, 120_000);
});
