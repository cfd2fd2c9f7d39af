import { createHash, randomUUID } from 'node:crypto';
import fs from 'node:fs';
import http from 'node:http';
import path from 'node:path';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { openTestDatabase } from '../support/app';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

// Uploads are streamed to storage while hashed; the size limit is inclusive; the name's extension
// must be the content's; names are UTF-8 without control or direction-override characters
// (Unicode TR #36 §2.1); CSV is served with formula-like cells neutralised (OWASP "CSV Injection")
// while the stored bytes and their SHA-256 stay as uploaded.

const maxBytes = 64 * 1024;
// A folder of this run's own (under the data folder), so no earlier or parallel run's files are counted.
const attachmentDir = path.resolve(process.env.ISOBAR_DATA_DIR ?? '.data', `test-attachments-uploads-${process.pid}`);
let db: DataSource;
let stack: TestStack;
let staff: string;

beforeAll(async () => {
  db = await openTestDatabase();
  stack = await startStack(db, { attachments: { dir: attachmentDir, maxBytes, maxConcurrentUploads: 1 } });
  staff = (await signIn(stack, usernameOf('staff'))).cookie;
});
afterAll(async () => {
  await stack.close();
  await db.destroy();
  fs.rmSync(attachmentDir, { recursive: true, force: true });
});

const api = () => request(stack.url);
const png = Buffer.from('89504e470d0a1a0a0000000d4948445200000001000000010806000000', 'hex');
const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex');

async function newStudy(): Promise<string> {
  const patient = { mrn: `U-${randomUUID().slice(0, 8)}`, familyName: 'Arnesen', givenName: 'Liv', birthDate: '1970-01-02', sex: 'female' };
  return (await api().post('/api/studies').set('Cookie', staff).set('Origin', stack.url).send({ patient }).expect(201)).body.id;
}
const upload = (studyId: string, bytes: Buffer, name: string) => api().post(`/api/studies/${studyId}/attachments`).set('Cookie', staff).set('Origin', stack.url).attach('file', bytes, name);

/** A CSV of exactly n bytes. */
function csvOfSize(n: number): Buffer {
  const head = 'time,pd\n';
  const row = '0.01,81.5\n';
  let text = head;
  while (text.length + row.length <= n) text += row;
  text = text.slice(0, -1) + ' '.repeat(n - text.length) + '\n';
  return Buffer.from(text);
}

describe('size limit', () => {
  it('accepts exactly the limit and refuses one byte more', async () => {
    const study = await newStudy();
    const exact = csvOfSize(maxBytes);
    expect(exact.length).toBe(maxBytes);
    const ok = await upload(study, exact, 'trace.csv').expect(201);
    expect(ok.body).toMatchObject({ sizeBytes: maxBytes, sha256: sha256(exact) });
    await upload(study, csvOfSize(maxBytes + 1), 'trace.csv').expect(413);
    // Nothing half-written is left behind (removed as the refused stream unwinds; bounded wait).
    const incoming = path.join(attachmentDir, 'incoming');
    const left = () => (fs.existsSync(incoming) ? fs.readdirSync(incoming) : []);
    for (let i = 0; i < 20 && left().length; i++) await new Promise((r) => setTimeout(r, 100));
    expect(left()).toEqual([]);
  });
});

describe('a path that names no study', () => {
  it('is refused before any byte is stored: 404, nothing left in the incoming folder (common practice)', async () => {
    const incoming = path.join(attachmentDir, 'incoming');
    const left = () => (fs.existsSync(incoming) ? fs.readdirSync(incoming) : []);
    const before = left().length;
    const res = await upload('not-a-study', png, 'x.png');
    expect(res.status).toBe(404);
    expect(res.headers['content-type']).toMatch(/^application\/problem\+json/);
    await new Promise((r) => setTimeout(r, 200));
    expect(left().length).toBe(before);
  });
});

describe('names', () => {
  it('refuses a PNG named .html or .exe, and names a PNG without an extension .png', async () => {
    const study = await newStudy();
    await upload(study, png, 'trace.html').expect(415);
    await upload(study, png, 'trace.exe').expect(415);
    const bare = await upload(study, png, 'trace').expect(201);
    expect(bare.body.fileName).toBe('trace.png');
  });

  it('keeps a UTF-8 name (emoji, accents) and strips control and direction-override characters', async () => {
    const study = await newStudy();
    const res = await upload(study, png, 'Ödegaard 📈\u202Egnp.png').expect(201);
    expect(res.body.fileName).toBe('Ödegaard 📈gnp.png');
    const [row] = await db.query(`SELECT file_name FROM attachment WHERE id = $1`, [res.body.id]);
    expect(row.file_name).toBe('Ödegaard 📈gnp.png');
  });
});

describe('CSV downloads', () => {
  it('serve formula-like cells neutralised, keeping the original bytes and checksum in storage', async () => {
    const study = await newStudy();
    const original = Buffer.from('time,pd,note\n0.01,-3.2,=HYPERLINK("http://example.invalid")\n0.02,81.5,@SUM(A1)\n');
    const up = await upload(study, original, 'trace.csv').expect(201);
    expect(up.body.sha256).toBe(sha256(original));
    const down = await api().get(`/api/attachments/${up.body.id}/content`).set('Cookie', staff).buffer(true).parse((res, cb) => {
      const chunks: Buffer[] = [];
      res.on('data', (c: Buffer) => chunks.push(c));
      res.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(down.status).toBe(200);
    expect((down.body as Buffer).toString('utf8')).toBe(`time,pd,note\n0.01,-3.2,"'=HYPERLINK(""http://example.invalid"")"\n0.02,81.5,'@SUM(A1)\n`);
    const [row] = await db.query(`SELECT storage_key, sha256 FROM attachment WHERE id = $1`, [up.body.id]);
    const stored = fs.readFileSync(path.join(attachmentDir, row.storage_key.slice(0, 2), row.storage_key));
    expect(stored.equals(original)).toBe(true);
    expect(row.sha256).toBe(sha256(original));
  });
});

describe('concurrent uploads', () => {
  it('are bounded: beyond the limit the answer is 503 with Retry-After, and the slot frees afterwards', async () => {
    const study = await newStudy();
    const url = new URL(`${stack.url}/api/studies/${study}/attachments`);
    const boundary = 'x-boundary-1';
    const head = Buffer.from(`--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="slow.png"\r\nContent-Type: image/png\r\n\r\n`);
    const tail = Buffer.from(`\r\n--${boundary}--\r\n`);
    const slow = http.request({
      host: url.hostname,
      port: url.port,
      method: 'POST',
      path: url.pathname,
      headers: { cookie: staff, origin: stack.url, 'content-type': `multipart/form-data; boundary=${boundary}`, 'content-length': String(head.length + png.length + tail.length) },
    });
    const slowDone = new Promise<number>((resolve, reject) => {
      slow.on('response', (res) => {
        res.resume();
        res.on('end', () => resolve(res.statusCode ?? 0));
      });
      slow.on('error', reject);
    });
    slow.write(head);
    slow.write(png.subarray(0, 8));
    await new Promise((r) => setTimeout(r, 300));
    const busy = await upload(study, png, 'second.png');
    expect(busy.status).toBe(503);
    expect(busy.headers['retry-after']).toMatch(/^\d+$/);
    slow.end(Buffer.concat([png.subarray(8), tail]));
    expect(await slowDone).toBe(201);
    await upload(study, png, 'third.png').expect(201);
  });
});
