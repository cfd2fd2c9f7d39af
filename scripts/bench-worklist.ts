// Benchmark: GET /api/studies over 100,000 studies, through HTTP with a real session.
// Run: bash scripts/bench-worklist.sh (makes the database and sets DATABASE_URL).
// Exits 1 when a case misses the target (p95 < 20 ms).
import type { DataSource } from 'typeorm';
import { worklistQuerySchema, type WorklistPage } from '../shared/study/worklist';
import { createDataSource } from '../server/db/data-source';
import { poolOf } from '../server/db/prepared';
import { prepareDatabase } from '../server/cli/prepare-database';
import type { AuditActor } from '../server/audit/audit';
import { worklistPageJson } from '../server/studies/worklist';
import { signIn, startStack } from '../tests/support/stack';
import { summary, timeRequests } from './bench-timing';

const STUDIES = 100_000;
const PATIENTS = 4_000;
const PHYSICIANS = 8;
const WARM_UP = 50;
const TIMED = 300;
const DEEP_PAGES = 200;
const TARGET_P95_MS = 20;
/** Who the direct calls of the service are recorded as in the audit trail (the HTTP requests are the signed-in user's). */
const benchActor: AuditActor = { actorUserId: null, actorName: 'worklist benchmark', actorRole: null, clientAddress: '127.0.0.1' };

const databaseUrl = process.env.DATABASE_URL;
if (!databaseUrl || !/\/isobar_bench$/.test(databaseUrl)) {
  console.error('DATABASE_URL must point at the isobar_bench database: run bash scripts/bench-worklist.sh');
  process.exit(2);
}

// Invented name parts; combinations give a skewed spread of family names, as real ones have.
const familyStarts = ['Ash', 'Bram', 'Cal', 'Dun', 'Elm', 'Fal', 'Gar', 'Hal', 'Ing', 'Jor', 'Kel', 'Lind', 'Mor', 'Nor', 'Ock', 'Pen', 'Quen', 'Ros', 'Sel', 'Thorn', 'Ul', 'Var', 'Wes', 'Yar', 'Zel', 'Brock', 'Carr', 'Dal', 'Fen', 'Hart'];
const familyEnds = ['by', 'den', 'ford', 'wick', 'ley', 'ton', 'mere', 'ridge', 'stead', 'well', 'field', 'more', 'holt', 'brook', 'combe', 'dale', 'gate', 'hurst', 'worth', 'shaw'];
const givenNames = ['Ada', 'Bram', 'Cora', 'Dmitri', 'Edda', 'Femi', 'Greta', 'Hugo', 'Ines', 'Jonas', 'Kaja', 'Levi', 'Mira', 'Nils', 'Oona', 'Pavel', 'Rhea', 'Soren', 'Tove', 'Uri', 'Vera', 'Wim', 'Xenia', 'Yannick', 'Zora'];
const physicianNames = ['Dr. Amira Solberg', 'Dr. Benedikt Oyelaran', 'Dr. Chiara Lindqvist', 'Dr. Dario Mensah', 'Dr. Eszter Falk', 'Dr. Farid Achterberg', 'Dr. Greta Nwosu', 'Dr. Henrik Baptiste'];
const indications = [
  'Intermediate lesion on angiography, exertional angina',
  'Angina with no obstructive disease',
  'Stable angina, positive stress test',
  'Result after coronary intervention',
  'Rest angina, suspected vasospasm',
  'Dyspnoea on exertion, non-obstructive disease on CT',
];

async function seed(ds: DataSource): Promise<void> {
  const began = performance.now();
  // One transaction, so one connection: setseed then holds for every insert.
  await ds.transaction(async (db) => {
    await db.query(`SELECT setseed(0.4711)`);
    await db.query(
      `INSERT INTO app_user (issuer, subject, email, display_name, role)
       SELECT 'bench', 'bench-physician-' || i, 'physician' || i || '@saltmarsh.example', ($1::text[])[i], 'physician'
       FROM generate_series(1, $2::int) i`,
      [physicianNames, PHYSICIANS],
    );
    // Squared random indexes: the first name parts are far more common than the last.
    await db.query(
      `INSERT INTO patient (mrn, family_name, given_name, birth_date, sex)
       SELECT 'BP-' || lpad(i::text, 6, '0'),
              ($1::text[])[1 + floor(power(random(), 2) * array_length($1::text[], 1))::int] || ($2::text[])[1 + floor(random() * array_length($2::text[], 1))::int],
              ($3::text[])[1 + floor(random() * array_length($3::text[], 1))::int],
              date '1935-01-01' + floor(random() * 365 * 65)::int,
              CASE WHEN random() < 0.5 THEN 'female' ELSE 'male' END
       FROM generate_series(1, $4::int) i`,
      [familyStarts, familyEnds, givenNames, PATIENTS],
    );
    // Procedures over three years in lab hours; recent cases still open, older ones nearly all signed;
    // 1% of records opened but with no procedure time yet (they sort by when they were opened).
    await db.query(
      `WITH pids AS (SELECT array_agg(id ORDER BY mrn) AS a FROM patient WHERE mrn LIKE 'BP-%'),
            ops AS (SELECT array_agg(id ORDER BY subject) AS a FROM app_user WHERE issuer = 'bench'),
            g AS (
              SELECT i, random() AS r, random() < 0.01 AS unstarted,
                     LEAST(date_trunc('day', now() - random() * interval '1095 days') + interval '7 hours' + random() * interval '10 hours',
                           now() - interval '30 minutes') AS started
              FROM generate_series(1, $1::int) i)
       INSERT INTO study (accession, patient_id, state, procedure_started_at, procedure_ended_at, operator_id, indication,
                          clinical_question, access_site, guide_french, created_at, updated_at)
       SELECT 'BEN-' || lpad(g.i::text, 6, '0'),
              pids.a[1 + floor(random() * array_length(pids.a, 1))::int],
              CASE
                WHEN g.unstarted THEN 'draft'
                WHEN g.started > now() - interval '1 day' THEN CASE WHEN g.r < 0.5 THEN 'draft' ELSE 'awaiting-signature' END
                WHEN g.started > now() - interval '7 days' THEN CASE WHEN g.r < 0.1 THEN 'draft' WHEN g.r < 0.3 THEN 'awaiting-signature' ELSE 'signed' END
                ELSE CASE WHEN g.r < 0.005 THEN 'draft' WHEN g.r < 0.015 THEN 'awaiting-signature' WHEN g.r < 0.05 THEN 'amended' ELSE 'signed' END
              END,
              CASE WHEN g.unstarted THEN NULL ELSE g.started END,
              CASE WHEN g.unstarted THEN NULL ELSE g.started + (30 + random() * 90) * interval '1 minute' END,
              ops.a[1 + floor(random() * array_length(ops.a, 1))::int],
              ($2::text[])[1 + floor(random() * array_length($2::text[], 1))::int],
              CASE WHEN random() < 0.6 THEN 'intermediate-lesion' ELSE 'angina-no-obstruction' END,
              CASE WHEN random() < 0.85 THEN 'right-radial' WHEN random() < 0.5 THEN 'left-radial' ELSE 'right-femoral' END,
              6,
              CASE WHEN g.unstarted THEN now() - random() * interval '2 days' ELSE g.started - interval '20 minutes' END,
              CASE WHEN g.unstarted THEN now() ELSE g.started + interval '1 day' END
       FROM g, pids, ops`,
      [STUDIES, indications],
    );
  });
  for (const table of ['patient', 'study', 'app_user']) await ds.query(`VACUUM (ANALYZE) ${table}`);
  const mix = await ds.query(`SELECT state, count(*)::int AS n FROM study GROUP BY state ORDER BY n DESC`);
  const span = (await ds.query(`SELECT min(sort_at)::date::text AS first, max(sort_at)::date::text AS last FROM study`))[0];
  console.log(`seeded ${STUDIES} studies, ${PATIENTS} patients, ${PHYSICIANS} physicians in ${((performance.now() - began) / 1000).toFixed(1)} s`);
  console.log(`  states: ${mix.map((m: { state: string; n: number }) => `${m.state} ${m.n}`).join(', ')}; dates ${span.first} … ${span.last}`);
}

async function main(): Promise<void> {
  await prepareDatabase(process.env.MIGRATION_DATABASE_URL!, databaseUrl!);
  const ds = createDataSource(databaseUrl!, 10);
  await ds.initialize();
  const settings = await ds.query(`SELECT current_setting('server_version') AS v, current_setting('fsync') AS fsync, current_setting('synchronous_commit') AS sc, current_setting('shared_buffers') AS sb`);
  console.log(`PostgreSQL ${settings[0].v}, fsync ${settings[0].fsync}, synchronous_commit ${settings[0].sc}, shared_buffers ${settings[0].sb}`);
  await seed(ds);

  // A family-name prefix as a user would type it: the first five letters of a mid-list patient's name.
  const [{ family, given }] = await ds.query(`SELECT family_name AS family, given_name AS given FROM patient WHERE mrn = 'BP-002000'`);
  const prefix = family.slice(0, 5).toLowerCase();
  const [{ patients, studies }] = await ds.query(
    `SELECT count(DISTINCT p.id)::int AS patients, count(s.id)::int AS studies FROM patient p JOIN study s ON s.patient_id = p.id
     WHERE lower(p.family_name) LIKE $1 OR lower(p.given_name) LIKE $1`,
    [`${prefix}%`],
  );

  const stack = await startStack(ds);
  let failed = false;
  try {
    const session = await signIn(stack, 'ivarga');
    const get = async (path: string): Promise<WorklistPage> => {
      const res = await fetch(`${stack.url}${path}`, { headers: { cookie: session.cookie } });
      if (res.status !== 200) throw new Error(`GET ${path}: ${res.status} ${await res.text()}`);
      return (await res.json()) as WorklistPage;
    };

    // One deep cursor, reached by following nextCursor as a user paging on would.
    let cursor: string | null = null;
    for (let i = 0; i < DEEP_PAGES; i++) {
      const page: WorklistPage = await get(`/api/studies?state=signed${cursor ? `&cursor=${encodeURIComponent(cursor)}` : ''}`);
      if (!page.nextCursor) throw new Error(`the signed worklist ended after ${i + 1} pages`);
      cursor = page.nextCursor;
    }

    const cases: { name: string; query: Record<string, string>; warmUp?: number; timed?: number }[] = [
      { name: '(a) first page, no filter', query: {} },
      { name: '(b) first page, state=signed', query: { state: 'signed' } },
      { name: `(c) page ${DEEP_PAGES + 1}, state=signed`, query: { state: 'signed', cursor: cursor! } },
      { name: `(d) search q=${prefix}`, query: { q: prefix } },
      // A name nobody has: the search's worst case.
      { name: '(e) search q=zzq, no match', query: { q: 'zzq' }, warmUp: 10, timed: 200 },
      // The other ways people type a patient: as lists print the name, given then family, MRN parts.
      { name: '(f) search "Family, G."', query: { q: `${family.toUpperCase()}, ${given.slice(0, 1)}.` } },
      { name: '(g) search "Given Family"', query: { q: `${given} ${family}` } },
      { name: '(h) search lower-case MRN', query: { q: 'bp-002000' } },
      { name: '(i) search MRN digits 002000', query: { q: '002000' } },
    ];
    console.log(`\nsearch prefix "${prefix}" matches ${patients} patients, ${studies} studies`);
    console.log(`\n${WARM_UP} warm-up + ${TIMED} timed sequential requests per case (e: 10 + 200); target p95 < ${TARGET_P95_MS} ms`);
    console.log('case                                 HTTP p50   p95    max  |  service p50   p95    max');
    const f = (x: number) => x.toFixed(2).padStart(6);
    {
      // Reference: a signed-in request that does no worklist query (session load and renewal only).
      const me = async () => fetch(`${stack.url}/api/me`, { headers: { cookie: session.cookie } }).then((r) => r.text());
      const h = summary(await timeRequests(me, { warmUp: WARM_UP, timed: TIMED }));
      console.log(`${'(ref) GET /api/me, session only'.padEnd(36)} ${f(h.p50)} ${f(h.p95)} ${f(h.max)}  |`);
    }
    for (const c of cases) {
      const path = `/api/studies?${new URLSearchParams(c.query)}`;
      const first = await get(path);
      if (first.items.length === 0 && !c.name.includes('no match')) throw new Error(`${c.name}: no rows`);
      const warmUp = c.warmUp ?? WARM_UP;
      const timed = c.timed ?? TIMED;
      const http = await timeRequests(() => get(path), { warmUp, timed });
      // The route's own service (its statement with the page's audit row) without HTTP and session, to tell where the time goes.
      const query = worklistQuerySchema.parse(c.query);
      const direct = await timeRequests(() => worklistPageJson(ds, query, benchActor), { warmUp, timed });
      const h = summary(http);
      const d = summary(direct);
      const pass = h.p95 < TARGET_P95_MS;
      failed ||= !pass;
      console.log(`${c.name.padEnd(36)} ${f(h.p50)} ${f(h.p95)} ${f(h.max)}  |    ${f(d.p50)} ${f(d.p95)} ${f(d.max)}  ${pass ? 'PASS' : 'FAIL'}`);
    }

    console.log('\nplans (EXPLAIN ANALYZE, BUFFERS) of the page statement worklistPageJson sends (its audit row rolled back):');
    for (const c of cases) {
      // The page statement goes to the pool (a prepared statement); a search's patient lookup goes through `query` first.
      const captured: { sql: string; params: unknown[] }[] = [];
      const pool = poolOf(ds);
      const spy = {
        query: (sql: string, params: unknown[]) => ds.query(sql, params),
        driver: { master: { query: (q: { text: string; values: unknown[] }) => (captured.push({ sql: q.text, params: q.values }), pool.query(q)) } },
      } as unknown as DataSource;
      await worklistPageJson(spy, worklistQuerySchema.parse(c.query), benchActor);
      const runner = ds.createQueryRunner();
      let plan: { 'QUERY PLAN': string }[];
      try {
        await runner.startTransaction();
        plan = await runner.query(`EXPLAIN (ANALYZE, BUFFERS) ${captured[0].sql}`, captured[0].params);
      } finally {
        await runner.rollbackTransaction();
        await runner.release();
      }
      const lines = plan.map((p) => p['QUERY PLAN']);
      console.log(c.name);
      console.log(`  ${lines[0]}`);
      for (const l of lines.slice(1).filter((x) => /Scan on|Scan using|Sort Key|Index Cond|Filter:/.test(x))) console.log(`  ${l}`);
      const buffers = lines.find((l) => l.trim().startsWith('Buffers:'));
      if (buffers) console.log(`  ${buffers.trim()} (top node)`);
      console.log(`  ${lines.find((l) => l.startsWith('Execution Time'))}`);
    }
  } finally {
    await stack.close();
    await ds.destroy();
  }
  if (failed) process.exitCode = 1;
}

main().catch((error) => {
  console.error(error);
  process.exit(1);
});
