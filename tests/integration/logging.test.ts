import { Writable } from 'node:stream';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { createApp } from '../../server/app';
import { createDataSource } from '../../server/db/data-source';
import { createLogger } from '../../server/log';
import { openOwnerDatabase, openTestDatabase, testConfig } from '../support/app';
import { signIn, startStack, usernameOf } from '../support/stack';

// The server log must never hold patient identifiers: a failing query carrying a recognisable
// (invented) name, MRN and birth date, and a search for that name, leave none of them in the log.

const marker = { familyName: 'Quxworthy', givenName: 'Zebedine', mrn: 'MRN-LOG-7731', birthDate: '1941-07-13' };
const secrets = [marker.familyName, marker.givenName, marker.mrn, marker.birthDate];

function captureLog() {
  const lines: string[] = [];
  const stream = new Writable({
    write(chunk, _enc, done) {
      lines.push(...String(chunk).split('\n').filter(Boolean));
      done();
    },
  });
  return { logger: createLogger('info', stream), lines, text: () => lines.join('\n') };
}

let db: DataSource;
let owner: DataSource;
beforeAll(async () => {
  db = await openTestDatabase();
  owner = await openOwnerDatabase();
  // A trigger that refuses this one invented patient, quoting the name in its message, as a real
  // constraint or data error would quote a value.
  await owner.query(`
    CREATE OR REPLACE FUNCTION test_refuse_marked_patient() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      IF NEW.family_name = '${marker.familyName}' THEN
        RAISE EXCEPTION 'refused patient % % (%)', NEW.family_name, NEW.mrn, NEW.birth_date;
      END IF;
      RETURN NEW;
    END $$`);
  await owner.query(`CREATE TRIGGER test_refuse_marked_patient BEFORE INSERT ON patient FOR EACH ROW EXECUTE FUNCTION test_refuse_marked_patient()`);
});
afterAll(async () => {
  await owner.query(`DROP TRIGGER IF EXISTS test_refuse_marked_patient ON patient`);
  await owner.query(`DROP FUNCTION IF EXISTS test_refuse_marked_patient()`);
  await owner.destroy();
  await db.destroy();
});

describe('the server log', () => {
  it('logs a failing query by its SQL and SQLSTATE, without its parameters or the database message', async () => {
    const capture = captureLog();
    const logged = createDataSource(process.env.DATABASE_URL!, 1, capture.logger);
    await logged.initialize();
    try {
      await expect(
        logged.query(`INSERT INTO patient (mrn, family_name, given_name, birth_date, sex) VALUES ($1, $2, $3, $4, 'female')`, [marker.mrn, marker.familyName, marker.givenName, marker.birthDate]),
      ).rejects.toThrow();
    } finally {
      await logged.destroy();
    }
    const failure = capture.lines.map((l) => JSON.parse(l)).find((l) => l.msg === 'database query failed');
    expect(failure).toMatchObject({ level: 50, err: { code: 'P0001' } });
    expect(failure.query).toContain('INSERT INTO patient');
    for (const s of secrets) expect(capture.text()).not.toContain(s);
  });

  it('logs a request that fails on such a query with a request id, and no patient data', async () => {
    const stack = await startStack(db);
    const cookie = (await signIn(stack, usernameOf('staff'))).cookie;
    await stack.close();

    const capture = captureLog();
    const app = createApp({ config: testConfig({ allowedOrigins: ['http://127.0.0.1:8470'] }), dataSource: db, logger: capture.logger });
    const res = await request(app)
      .post('/api/studies')
      .set('Cookie', cookie)
      .set('Origin', 'http://127.0.0.1:8470')
      .set('X-Request-Id', 'trace-abc-123')
      .send({ patient: { mrn: marker.mrn, familyName: marker.familyName, givenName: marker.givenName, birthDate: marker.birthDate, sex: 'male' } });
    expect(res.status).toBe(500);
    expect(res.headers['x-request-id']).toBe('trace-abc-123');
    const search = await request(app).get(`/api/studies?q=${marker.familyName}`).set('Cookie', cookie).expect(200);
    expect(search.headers['x-request-id']).toMatch(/^[0-9a-f-]{36}$/);

    const entries = capture.lines.map((l) => JSON.parse(l));
    const unhandled = entries.find((l) => l.msg === 'unhandled error');
    expect(unhandled).toMatchObject({ reqId: 'trace-abc-123', method: 'POST', path: '/api/studies', err: { code: 'P0001' } });
    expect(entries.filter((l) => l.msg === 'request finished' || l.msg === 'request failed').map((l) => l.req.path)).toEqual(['/api/studies', '/api/studies']);
    for (const s of secrets) expect(capture.text()).not.toContain(s);
  });
});
