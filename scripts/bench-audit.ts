// Benchmark: the first page of audit trail searches over the trail of 1,000,000 studies (ten years),
// through HTTP with a real session, and the same query alone; then the plans it relies on.
// Run: npm run bench:audit (bash scripts/bench-audit.sh makes the database and sets the URLs).
// Exits 1 when a case misses the target (HTTP p95 < 50 ms).
import os from 'node:os';
import type { DataSource } from 'typeorm';
import { auditTrailQuerySchema, type AuditTrailPage } from '../shared/audit/trail';
import { createDataSource } from '../server/db/data-source';
import { prepareDatabase } from '../server/cli/prepare-database';
import { decodeAuditCursor, pageQuery, prepareSearch } from '../server/audit/queries/audit-trail';
import { readAuditTrail } from '../server/audit/audit-trail';
import { signIn, startStack } from '../tests/support/stack';
import { summary, timeRequests } from './bench-timing';

const STUDIES = Number(process.env.BENCH_STUDIES ?? 1_000_000);
const PATIENTS = Math.round(STUDIES * 0.4);
const YEARS = 10;
const WARM_UP = 30;
const TIMED = 200;
const TARGET_P95_MS = 50;

const databaseUrl = process.env.DATABASE_URL;
const ownerUrl = process.env.MIGRATION_DATABASE_URL;
if (!databaseUrl || !ownerUrl || !/\/isobar_audit_bench$/.test(databaseUrl)) {
  console.error('DATABASE_URL must point at the isobar_audit_bench database: run npm run bench:audit');
  process.exit(2);
}

// Invented staff of an invented lab.
const people: [name: string, role: string][] = [
  ...['Dr. Amira Solberg', 'Dr. Benedikt Oyelaran', 'Dr. Chiara Lindqvist', 'Dr. Dario Mensah', 'Dr. Eszter Falk', 'Dr. Farid Achterberg', 'Dr. Greta Nwosu', 'Dr. Henrik Baptiste'].map((n) => [n, 'physician'] as [string, string]),
  ...['Ilse Moravec, RN', 'Jonas Kettering, RN', 'Kaja Oduro, RN', 'Lotte Brennan, RN', 'Marek Sandoval, RN', 'Nadia Hollis, RN', 'Oskar Tamm, RN', 'Petra Vukovic, RN', 'Quinn Abara, RN', 'Runa Eklund, RN', 'Sami Varga, RN', 'Tilde Moreau, RN'].map((n) => [n, 'staff'] as [string, string]),
  ...['Uma Castell, CCS', 'Viggo Arnesen, CCS', 'Wanda Pruitt, CCS', 'Ximena Loft, CCS'].map((n) => [n, 'coder'] as [string, string]),
  ['Yara Holm', 'chief'],
  ['Zeno Grady', 'admin'],
];
const familyStarts = ['Ash', 'Bram', 'Cal', 'Dun', 'Elm', 'Fal', 'Gar', 'Hal', 'Ing', 'Jor', 'Kel', 'Lind', 'Mor', 'Nor', 'Ock', 'Pen', 'Quen', 'Ros', 'Sel', 'Thorn', 'Ul', 'Var', 'Wes', 'Yar', 'Zel', 'Brock', 'Carr', 'Dal', 'Fen', 'Hart'];
const familyEnds = ['by', 'den', 'ford', 'wick', 'ley', 'ton', 'mere', 'ridge', 'stead', 'well', 'field', 'more', 'holt', 'brook', 'combe', 'dale', 'gate', 'hurst', 'worth', 'shaw'];
const givenNames = ['Ada', 'Bram', 'Cora', 'Dmitri', 'Edda', 'Femi', 'Greta', 'Hugo', 'Ines', 'Jonas', 'Kaja', 'Levi', 'Mira', 'Nils', 'Oona', 'Pavel', 'Rhea', 'Soren', 'Tove', 'Uri', 'Vera', 'Wim', 'Xenia', 'Yannick', 'Zora'];

const seconds = (t0: number) => ((performance.now() - t0) / 1000).toFixed(1);

async function seed(owner: DataSource): Promise<void> {
  const began = performance.now();
  // The audit indexes are dropped for the bulk load and built again from their own definitions
  // (as the migration made them), which is much faster than maintaining them row by row.
  const indexes: { name: string; def: string }[] = await owner.query(
    `SELECT indexname AS name, indexdef AS def FROM pg_indexes WHERE tablename = 'audit_event' AND indexname <> 'audit_event_pkey'`,
  );
  await owner.transaction(async (db) => {
    await db.query(`SET LOCAL synchronous_commit = off`);
    await db.query(`SET LOCAL work_mem = '256MB'`);
    await db.query(`SELECT setseed(0.4711)`);
    for (const ix of indexes) await db.query(`DROP INDEX ${ix.name}`);
    await db.query(
      `INSERT INTO app_user (issuer, subject, email, display_name, role)
       SELECT 'bench', 'bench-' || i, 'user' || i || '@saltmarsh.example', ($1::text[])[i], ($2::text[])[i]
       FROM generate_series(1, array_length($1::text[], 1)) i`,
      [people.map((p) => p[0]), people.map((p) => p[1])],
    );
    await db.query(
      `INSERT INTO patient (mrn, family_name, given_name, birth_date, sex)
       SELECT 'AP-' || lpad(i::text, 7, '0'),
              ($1::text[])[1 + floor(power(random(), 2) * array_length($1::text[], 1))::int] || ($2::text[])[1 + floor(random() * array_length($2::text[], 1))::int],
              ($3::text[])[1 + floor(random() * array_length($3::text[], 1))::int],
              date '1935-01-01' + floor(random() * 365 * 65)::int,
              CASE WHEN random() < 0.5 THEN 'female' ELSE 'male' END
       FROM generate_series(1, $4::int) i`,
      [familyStarts, familyEnds, givenNames, PATIENTS],
    );
    console.log(`  users and ${PATIENTS} patients: ${seconds(began)} s`);
    // Studies evenly over ten years, in lab hours; all signed but the last days'.
    await db.query(
      `WITH pids AS (SELECT array_agg(id ORDER BY mrn) AS a FROM patient WHERE mrn LIKE 'AP-%'),
            docs AS (SELECT array_agg(id ORDER BY subject) AS a FROM app_user WHERE issuer = 'bench' AND role = 'physician'),
            g AS (SELECT i, date_trunc('day', now() - ($2::int * 365.25 * (i::float8 / $1::int)) * interval '1 day') + interval '7 hours' + random() * interval '10 hours' AS started
                  FROM generate_series(1, $1::int) i)
       INSERT INTO study (accession, patient_id, state, procedure_started_at, procedure_ended_at, operator_id, created_at, updated_at)
       SELECT 'AB-' || lpad(g.i::text, 7, '0'), pids.a[1 + floor(random() * array_length(pids.a, 1))::int],
              CASE WHEN g.started > now() - interval '3 days' THEN 'awaiting-signature' ELSE 'signed' END,
              g.started, g.started + interval '50 minutes', docs.a[1 + floor(random() * array_length(docs.a, 1))::int],
              g.started - interval '20 minutes', g.started + interval '1 day'
       FROM g, pids, docs`,
      [STUDIES, YEARS],
    );
    console.log(`  ${STUDIES} studies: ${seconds(began)} s`);
    // Five events per study, as the lab would leave them: staff open the record and change it,
    // the operator reads and signs it, a coder reads it; then each working day's sign-ins and
    // list searches. Everything in time order, so ids grow with time as in real use.
    await db.query(
      `WITH staff AS (SELECT array_agg(id ORDER BY subject) AS ids, array_agg(display_name ORDER BY subject) AS names FROM app_user WHERE issuer = 'bench' AND role = 'staff'),
            coders AS (SELECT array_agg(id ORDER BY subject) AS ids, array_agg(display_name ORDER BY subject) AS names FROM app_user WHERE issuer = 'bench' AND role = 'coder'),
            ev AS (
              SELECT s.id AS study_id, s.procedure_started_at AS t, s.operator_id, k,
                     1 + floor(random() * 12)::int AS sx, 1 + floor(random() * 4)::int AS cx
              FROM study s CROSS JOIN generate_series(1, 5) k
              WHERE s.accession LIKE 'AB-%')
       INSERT INTO audit_event (recorded_at, actor_user_id, actor_name, actor_role, action, entity_type, entity_id, client_address, outcome, detail)
       SELECT CASE k WHEN 1 THEN t - interval '20 minutes' WHEN 2 THEN t + interval '55 minutes' WHEN 3 THEN t + interval '3 hours'
                     WHEN 4 THEN t + interval '5 hours' ELSE t + interval '2 days' END,
              CASE WHEN k IN (1, 2) THEN staff.ids[sx] WHEN k IN (3, 4) THEN ev.operator_id ELSE coders.ids[cx] END,
              CASE WHEN k IN (1, 2) THEN staff.names[sx] WHEN k IN (3, 4) THEN u.display_name ELSE coders.names[cx] END,
              CASE WHEN k IN (1, 2) THEN 'staff' WHEN k IN (3, 4) THEN 'physician' ELSE 'coder' END,
              (ARRAY['create', 'update', 'read', 'sign', 'read'])[k],
              CASE WHEN k = 5 THEN 'study-coding' ELSE 'study' END, ev.study_id::text,
              '10.8.' || (k * 10 + sx) || '.' || cx, 'success',
              CASE k WHEN 2 THEN '{"sections":["vessels"]}'::jsonb WHEN 4 THEN '{"reportVersion":1}'::jsonb END
       FROM ev CROSS JOIN staff CROSS JOIN coders JOIN app_user u ON u.id = ev.operator_id
       ORDER BY 1`,
    );
    console.log(`  study events: ${seconds(began)} s`);
    await db.query(
      `INSERT INTO audit_event (recorded_at, actor_user_id, actor_name, actor_role, action, entity_type, entity_id, client_address, outcome, detail)
       SELECT d + interval '7 hours' + random() * interval '2 hours', u.id, u.display_name, u.role, a.action,
              CASE WHEN a.action = 'search' THEN 'study' ELSE 'user' END, CASE WHEN a.action = 'search' THEN NULL ELSE u.id::text END,
              '10.8.0.' || (random() * 250)::int, 'success', CASE WHEN a.action = 'search' THEN '{"returned":25}'::jsonb END
       FROM generate_series(date_trunc('day', now() - $1::int * interval '1 year'), now() - interval '1 day', interval '1 day') d
       CROSS JOIN app_user u CROSS JOIN (VALUES ('sign-in'), ('search'), ('sign-out')) a(action)
       WHERE u.issuer = 'bench' AND extract(isodow FROM d) < 6
       ORDER BY 1`,
      [YEARS],
    );
    console.log(`  sign-ins and list searches: ${seconds(began)} s`);
    await seedFailures(db);
    await db.query(`SET LOCAL maintenance_work_mem = '512MB'`);
    for (const ix of indexes) await db.query(ix.def);
    console.log(`  indexes rebuilt (${indexes.map((i) => i.name).join(', ')}): ${seconds(began)} s`);
  });
  for (const table of ['audit_event', 'patient', 'study', 'app_user']) await owner.query(`VACUUM (ANALYZE) ${table}`);
  const [{ n, first, last, size }] = await owner.query(
    `SELECT count(*)::int AS n, min(recorded_at)::date::text AS first, max(recorded_at)::date::text AS last, pg_size_pretty(pg_total_relation_size('audit_event')) AS size FROM audit_event`,
  );
  console.log(`seeded ${STUDIES} studies, ${PATIENTS} patients, ${people.length} users, ${n} audit events (${first} … ${last}, ${size} with indexes) in ${seconds(began)} s`);
}

/** Rare failures: a mistyped password most working days, now and then a refused page. */
async function seedFailures(db: Pick<DataSource, 'query'>): Promise<void> {
  await db.query(
    `INSERT INTO audit_event (recorded_at, actor_user_id, actor_name, actor_role, action, entity_type, client_address, outcome, detail)
     SELECT d + interval '7 hours' + random() * interval '9 hours',
            CASE WHEN k = 1 THEN NULL ELSE u.id END, CASE WHEN k = 1 THEN NULL ELSE u.display_name END, CASE WHEN k = 1 THEN NULL ELSE u.role END,
            CASE WHEN k = 1 THEN 'sign-in-failed' ELSE 'access-denied' END, NULL, '10.8.0.' || (random() * 250)::int,
            CASE WHEN k = 1 THEN 'failure' ELSE 'denied' END,
            CASE WHEN k = 1 THEN '{"reason":"access_denied"}'::jsonb ELSE '{"method":"GET","path":"/api/admin/users","needs":"admin:manage"}'::jsonb END
     FROM generate_series(date_trunc('day', now() - $1::int * interval '1 year'), now() - interval '1 day', interval '1 day') d
     CROSS JOIN generate_series(1, 2) k
     CROSS JOIN LATERAL (SELECT id, display_name, role FROM app_user WHERE issuer = 'bench' ORDER BY md5(d::text || id::text) LIMIT 1) u
     WHERE extract(isodow FROM d) < 6 AND (k = 1 OR extract(day FROM d)::int % 7 = 0)
     ORDER BY 1`,
    [YEARS],
  );
}

async function main(): Promise<void> {
  await prepareDatabase(ownerUrl!, databaseUrl!);
  const owner = createDataSource(ownerUrl!, 2);
  await owner.initialize();
  const ds = createDataSource(databaseUrl!, 10);
  await ds.initialize();
  const settings = await ds.query(`SELECT current_setting('server_version') AS v, current_setting('shared_buffers') AS sb, current_setting('work_mem') AS wm`);
  console.log(`PostgreSQL ${settings[0].v}, shared_buffers ${settings[0].sb}, work_mem ${settings[0].wm}`);
  const [{ seeded }] = await owner.query(`SELECT count(*)::int AS seeded FROM study WHERE accession LIKE 'AB-%'`);
  if (process.env.ISOBAR_BENCH_REUSE && seeded === STUDIES) {
    console.log(`reusing the seeded database (${seeded} studies)`);
    const [{ failures }] = await owner.query(`SELECT count(*)::int AS failures FROM audit_event WHERE outcome <> 'success' AND client_address LIKE '10.8.%'`);
    if (!failures) {
      await seedFailures(owner);
      await owner.query(`VACUUM (ANALYZE) audit_event`);
    }
  } else await seed(owner);
  await owner.destroy();
  console.log(`load average (1, 5, 15 min) before timing: ${os.loadavg().map((x) => x.toFixed(1)).join(' ')} on ${os.cpus().length} cores`);

  // Typical searches: a patient by MRN (a mid-list one) and by family-name start, a study, a busy
  // physician over a month, a busy nurse over a year, one action, the failures.
  const [mid] = await ds.query(`SELECT p.mrn, p.family_name FROM patient p WHERE p.mrn = 'AP-' || lpad(($1::int / 2)::text, 7, '0')`, [PATIENTS]);
  const [acc] = await ds.query(`SELECT accession FROM study WHERE accession = 'AB-' || lpad(($1::int / 3)::text, 7, '0')`, [STUDIES]);
  const month = { from: new Date(Date.now() - 400 * 86_400_000).toISOString().slice(0, 10), to: new Date(Date.now() - 370 * 86_400_000).toISOString().slice(0, 10) };
  const year = { from: new Date(Date.now() - 5 * 365 * 86_400_000).toISOString().slice(0, 10), to: new Date(Date.now() - 4 * 365 * 86_400_000).toISOString().slice(0, 10) };
  const prefix = mid.family_name.slice(0, 6).toLowerCase();

  const stack = await startStack(ds);
  const load = () => os.loadavg().map((x) => x.toFixed(1)).join(' ');
  let failed = false;
  try {
    // The chief of the demo users (the real sign-in flow); the seeded people are only actors in the trail.
    const session = await signIn(stack, 'shalvorsen');
    const get = async (path: string): Promise<AuditTrailPage> => {
      const res = await fetch(`${stack.url}${path}`, { headers: { cookie: session.cookie } });
      if (res.status !== 200) throw new Error(`GET ${path}: ${res.status} ${await res.text()}`);
      return (await res.json()) as AuditTrailPage;
    };
    // A deep cursor: 40 pages into the unfiltered trail.
    let cursor: string | null = null;
    for (let i = 0; i < 40; i++) cursor = (await get(`/api/audit-trail${cursor ? `?cursor=${encodeURIComponent(cursor)}` : ''}`)).nextCursor;

    const cases: { name: string; query: Record<string, string> }[] = [
      { name: '(a) no filter', query: {} },
      { name: `(b) patient MRN ${mid.mrn.toLowerCase()}`, query: { patient: mid.mrn.toLowerCase() } },
      { name: `(c) user "solberg" + a month`, query: { user: 'solberg', ...month } },
      { name: `(d) user "moravec" + a year`, query: { user: 'moravec', ...year } },
      { name: `(e) study ${acc.accession.toLowerCase()}`, query: { study: acc.accession.toLowerCase() } },
      { name: `(f) patient name "${prefix}"`, query: { patient: prefix } },
      { name: '(g) action sign + a month', query: { action: 'sign', ...month } },
      { name: '(h) outcome failure', query: { outcome: 'failure' } },
      { name: '(h2) action access-denied', query: { action: 'access-denied' } },
      { name: '(i) no filter, page 41', query: { cursor: cursor! } },
    ];
    console.log(`\n${WARM_UP} warm-up + ${TIMED} timed sequential requests per case, 50 rows a page; target HTTP p95 < ${TARGET_P95_MS} ms`);
    console.log('case                                     rows |  HTTP p50    p95    max |  query p50    p95    max');
    const f = (x: number) => x.toFixed(2).padStart(6);
    {
      // Reference: a signed-in request that reads no audit data (session load and renewal only).
      const me = async () => fetch(`${stack.url}/api/me`, { headers: { cookie: session.cookie } }).then((r) => r.text());
      const h = summary(await timeRequests(me, { warmUp: WARM_UP, timed: TIMED }));
      console.log(`${'(ref) GET /api/me, session only'.padEnd(40)}      | ${f(h.p50)} ${f(h.p95)} ${f(h.max)} |`);
    }
    for (const c of cases) {
      const path = `/api/audit-trail?${new URLSearchParams(c.query)}`;
      const first = await get(path);
      const http = await timeRequests(() => get(path), { warmUp: WARM_UP, timed: TIMED });
      // The same search without HTTP, session and the audit row it writes.
      const q = auditTrailQuerySchema.parse(c.query);
      const direct = await timeRequests(() => readAuditTrail(ds, q, q.cursor, q.limit), { warmUp: WARM_UP, timed: TIMED });
      const h = summary(http);
      const d = summary(direct);
      const pass = h.p95 < TARGET_P95_MS;
      failed ||= !pass;
      console.log(`${c.name.padEnd(40)} ${String(first.items.length).padStart(4)} | ${f(h.p50)} ${f(h.p95)} ${f(h.max)} | ${f(d.p50)} ${f(d.p95)} ${f(d.max)}  ${pass ? 'PASS' : 'FAIL'}`);
    }

    console.log('\nplans (EXPLAIN ANALYZE, BUFFERS) of the page query of each case:');
    for (const c of cases) {
      const q = auditTrailQuerySchema.parse(c.query);
      const search = await prepareSearch(ds, q);
      const { sql, params } = pageQuery(q, search.resolved, q.cursor ? decodeAuditCursor(q.cursor) : null, q.limit + 1);
      const plan: { 'QUERY PLAN': string }[] = await ds.query(`EXPLAIN (ANALYZE, BUFFERS) ${sql}`, params);
      const lines = plan.map((p) => p['QUERY PLAN']);
      const keys = Object.entries(search.resolved).map(([k, v]) => `${k}: ${'ids' in v! ? `${v!.ids.length} ids` : 'many (subquery)'}`);
      console.log(`${c.name}${keys.length ? ` — keys ${keys.join(', ')}` : ''}`);
      for (const l of lines.filter((x) => /Scan on|Scan using|Index Cond|Filter:|Sort Key|Limit|Nested Loop|Function Scan|SubPlan/.test(x))) console.log(`  ${l.replace(/\s+\(cost=[^)]*\)/, '')}`);
      const buffers = lines.find((l) => l.trim().startsWith('Buffers:'));
      if (buffers) console.log(`  ${buffers.trim()} (top node)`);
      console.log(`  ${lines.find((l) => l.startsWith('Execution Time'))}`);
    }
  } finally {
    await stack.close();
    await ds.destroy();
  }
  console.log(`load average (1, 5, 15 min) after timing: ${load()}`);
  if (failed) process.exitCode = 1;
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
