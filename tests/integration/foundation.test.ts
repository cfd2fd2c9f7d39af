import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { createApp } from '../../server/app';
import { createDataSource } from '../../server/db/data-source';
import { Study } from '../../server/db/entities/study.entity';
import { Patient } from '../../server/db/entities/patient.entity';
import { openTestDatabase, testConfig } from '../support/app';
import { startTcpProxy } from '../support/tcp-proxy';

let db: DataSource;
let app: ReturnType<typeof createApp>;

beforeAll(async () => {
  db = await openTestDatabase();
  app = createApp({ config: testConfig(), dataSource: db, log: () => undefined });
});
afterAll(async () => {
  await db.destroy();
});

const problemType = /^application\/problem\+json/;

describe('GET /api/health', () => {
  it('answers 200 when the database answers', async () => {
    const res = await request(app).get('/api/health').expect(200);
    expect(res.body).toMatchObject({ status: 'ok', database: 'up' });
    expect(res.headers['cache-control']).toBe('no-store');
    // Never cached, so no ETag is computed for it (common practice: validators serve caches).
    expect(res.headers.etag).toBeUndefined();
  });

  it('answers 503 problem+json once the database stops answering', async () => {
    const target = new URL(process.env.DATABASE_URL!);
    const proxy = await startTcpProxy(target.hostname, Number(target.port));
    const via = new URL(target.href);
    via.port = String(proxy.port);
    const proxied = createDataSource(via.href, 1);
    await proxied.initialize();
    const proxiedApp = createApp({ config: testConfig(), dataSource: proxied, log: () => undefined });
    try {
      await request(proxiedApp).get('/api/health').expect(200);
      proxy.cut();
      const res = await request(proxiedApp).get('/api/health');
      expect(res.status).toBe(503);
      expect(res.headers['content-type']).toMatch(problemType);
      expect(res.body).toMatchObject({ status: 503, title: 'Service unavailable', detail: 'The database is not answering.' });
    } finally {
      await proxied.destroy().catch(() => undefined);
      await proxy.close();
    }
  });
});

describe('errors as RFC 9457 problem+json', () => {
  it('answers an unknown /api route with a 404 problem', async () => {
    const res = await request(app).get('/api/no-such-thing?x=1').expect(404);
    expect(res.headers['content-type']).toMatch(problemType);
    expect(res.body).toEqual({
      type: 'https://isobar.example/problems/not-found',
      title: 'Not found',
      status: 404,
      detail: 'No API route answers GET /api/no-such-thing.',
      instance: '/api/no-such-thing',
    });
  });

  it('answers malformed JSON with a 400 problem and no stack trace', async () => {
    const res = await request(app).post('/api/health').set('Origin', 'http://127.0.0.1:8470').set('Content-Type', 'application/json').send('{"pa": 9');
    expect(res.status).toBe(400);
    expect(res.headers['content-type']).toMatch(problemType);
    expect(res.body.detail).toBe('The request body is not valid JSON.');
    expect(res.text).not.toMatch(/at .*\.(js|ts):\d+/);
  });

  it('refuses a body over the size limit with 413', async () => {
    const small = createApp({ config: testConfig({ jsonBodyLimit: '1kb' }), dataSource: db, log: () => undefined });
    const res = await request(small).post('/api/anything').set('Origin', 'http://127.0.0.1:8470').set('Content-Type', 'application/json').send(JSON.stringify({ note: 'x'.repeat(4096) }));
    expect(res.status).toBe(413);
    expect(res.headers['content-type']).toMatch(problemType);
  });
});

describe('security headers', () => {
  it('sets a content security policy and the usual hardening headers', async () => {
    const res = await request(app).get('/api/health');
    expect(res.headers['content-security-policy']).toContain("default-src 'self'");
    expect(res.headers['content-security-policy']).toContain("frame-ancestors 'self'");
    expect(res.headers['x-content-type-options']).toBe('nosniff');
    expect(res.headers['x-frame-options']).toBe('SAMEORIGIN');
    expect(res.headers['x-powered-by']).toBeUndefined();
  });
});

describe('the web app', () => {
  it('serves the exported page for client-side routes', async () => {
    const res = await request(app).get('/studies/some-id').expect(200);
    expect(res.headers['content-type']).toMatch(/text\/html/);
    expect(res.text).toContain('<div id="root">');
    expect(res.headers['cache-control']).toBe('no-store');
  });
});

describe('schema', () => {
  it('has run every migration', async () => {
    expect(await db.showMigrations()).toBe(false);
  });

  it('stores timestamps with their time zone', async () => {
    const rows: { column_name: string; data_type: string }[] = await db.query(
      `SELECT column_name, data_type FROM information_schema.columns WHERE table_name = 'study' AND column_name LIKE '%_at'`,
    );
    expect(rows.length).toBeGreaterThanOrEqual(4);
    for (const row of rows) expect(row.data_type).toBe('timestamp with time zone');
  });

  it('raises a study version on every save (optimistic concurrency)', async () => {
    const patient = await db.getRepository(Patient).save({
      mrn: `T-${Date.now()}`,
      familyName: 'Testperson',
      givenName: 'Ada',
      birthDate: '1970-01-01',
      sex: 'female',
    });
    const studies = db.getRepository(Study);
    const study = await studies.save(studies.create({ accession: `ACC-${Date.now()}`, patientId: patient.id }));
    expect(study.version).toBe(1);
    study.indication = 'Intermediate lesion';
    const saved = await studies.save(study);
    expect(saved.version).toBe(2);
    expect((await studies.findOneByOrFail({ id: study.id })).state).toBe('draft');
  });
});
