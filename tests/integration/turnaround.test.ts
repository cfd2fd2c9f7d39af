import { randomUUID } from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { DataSource } from 'typeorm';
import { Logger, parseCronItems, runOnce } from 'graphile-worker';
import type { PhysiologyInput } from '../../shared/physiology';
import type { TurnaroundFigures } from '../../shared/turnaround/figures';
import { startFakeSmtp } from '../../server/fakes/smtp';
import { turnaroundFigures } from '../../server/turnaround/queries/figures';
import { overdueCronItems, queueOverdueNotices, queueOverdueNoticesTask, sendOverdueNoticeTask } from '../../server/turnaround/overdue-notices';
import { labSettings } from '../../server/settings/queries/lab-settings';
import { createDataSource } from '../../server/db/data-source';
import { openTestDatabase } from '../support/app';
import { turnaroundSeeder } from '../support/turnaround';
import { signIn, startStack, usernameOf, type TestStack } from '../support/stack';

// Everything here is invented. The figures are checked against values worked out by hand:
// percentile_cont interpolates linearly between the ordered values at position p × (n − 1)
// (PostgreSQL documentation, "Ordered-Set Aggregate Functions"); weeks are ISO 8601 weeks
// (Monday first; week 1 holds the year's first Thursday).

let db: DataSource;
let seedStudy: ReturnType<typeof turnaroundSeeder>['seedStudy'];
let user: ReturnType<typeof turnaroundSeeder>['user'];
let stack: TestStack;
let cookie: string;
const H = 3_600_000;
const tag = randomUUID().slice(0, 6).toUpperCase();

const get = (path: string) => fetch(`${stack.url}${path}`, { headers: { cookie } });
const figures = async (from: string, to: string): Promise<TurnaroundFigures> => {
  const response = await get(`/api/turnaround/figures?from=${from}&to=${to}`);
  expect(response.status).toBe(200);
  return response.json();
};

// Vessels for the quality figures: pressures (FFR formula Pd/Pa), a drift check, transit times.
const pressureVessel = (extra: Record<string, unknown>, input: Partial<PhysiologyInput['vessels'][number]>) => {
  const id = randomUUID();
  return {
    snapshot: { id, vessel: 'LAD', restPa: 100, restPd: 95, hyperemiaPa: 90, hyperemiaPd: 72, ...extra },
    input: { id, vessel: 'LAD' as const, rest: { pa: 100, pd: 95 }, hyperemia: { pa: 90, pd: 72 }, ...input },
  };
};
const visualOnly = () => {
  const id = randomUUID();
  return { snapshot: { id, vessel: 'RCA', visualStenosisPct: 30, restTransit: [], hyperemiaTransit: [] }, input: { id, vessel: 'RCA' as const, visualStenosisPct: 30 } };
};

let lateId: string;
let promptId: string;
let pendingStudy: { id: string; accession: string };
const at = (iso: string) => new Date(iso);

beforeAll(async () => {
  db = await openTestDatabase();
  ({ seedStudy, user } = turnaroundSeeder(db, tag));
  stack = await startStack(db);
  ({ cookie } = await signIn(stack, usernameOf('chief')));
  lateId = await user(`Dr Late ${tag}`, 'physician', null);
  promptId = await user(`=Dr Prompt ${tag}`, 'physician', null);

  // Two ISO weeks, 2003-W10 (3–9 March) and 2003-W11 (10–16 March), in UTC (the default lab zone).
  await seedStudy({
    operatorId: lateId, endedAt: at('2003-03-03T10:00:00Z'), signedAfterH: 10, codedAfterSignH: 20, deliveredAfterSignH: 1,
    vessels: [pressureVessel({ driftPdPa: 0.99, restTransit: [0.9, 0.9, 0.9], hyperemiaTransit: [0.3, 0.3, 0.3] }, { driftPdPa: 0.99, rest: { pa: 100, pd: 95, tmn: [0.9, 0.9, 0.9] }, hyperemia: { pa: 90, pd: 72, tmn: [0.3, 0.3, 0.3] } })],
  });
  await seedStudy({
    operatorId: lateId, endedAt: at('2003-03-04T10:00:00Z'), signedAfterH: 30, codedAfterSignH: 5, deliveredAfterSignH: 2,
    vessels: [pressureVessel({ restTransit: [0.9, 0.9], hyperemiaTransit: [0.3, 0.3, 0.3] }, { rest: { pa: 100, pd: 95, tmn: [0.9, 0.9] }, hyperemia: { pa: 90, pd: 72, tmn: [0.3, 0.3, 0.3] } })],
  });
  // Codes not yet reviewed: that interval and "all done" stay open.
  await seedStudy({
    operatorId: lateId, endedAt: at('2003-03-05T10:00:00Z'), signedAfterH: 50, deliveredAfterSignH: 3,
    vessels: [pressureVessel({ driftPdPa: 1.04 }, { driftPdPa: 1.04 })],
  });
  await seedStudy({ accession: `=HYPERLINK("x")-${tag}`, operatorId: promptId, endedAt: at('2003-03-06T10:00:00Z'), signedAfterH: 2, codedAfterSignH: 4, deliveredAfterSignH: 1, vessels: [visualOnly()] });
  await seedStudy({ operatorId: promptId, endedAt: at('2003-03-11T10:00:00Z'), signedAfterH: 4, codedAfterSignH: 6, deliveredAfterSignH: 2, vessels: [visualOnly()] });
  // Unsigned: one with only a start time, one with no procedure time at all (counts from when it was opened).
  await seedStudy({ operatorId: promptId, startedAt: at('2003-03-12T08:00:00Z') });
  await seedStudy({ createdAt: at('2003-03-13T09:00:00Z') });
  pendingStudy = await seedStudy({ operatorId: lateId, endedAt: new Date(Date.now() - 30 * H) });
});
afterAll(async () => {
  await stack?.close();
  await db?.destroy();
});

describe('GET /api/turnaround/figures', () => {
  it('gives the median and 90th percentile per ISO week, worked out by hand', async () => {
    const f = await figures('2003-03-03', '2003-03-16');
    expect(f.timeZone).toBe('UTC');
    expect(f.studies).toBe(7);
    expect(f.weeks.map((w) => [w.week, w.weekStart, w.studies])).toEqual([
      ['2003-W10', '2003-03-03', 4],
      ['2003-W11', '2003-03-10', 3],
    ]);
    // Week 10, procedure end → signature: 2, 10, 30, 50 h. Median (10 + 30) / 2 = 20;
    // p90 at position 0.9 × 3 = 2.7: 30 + 0.7 × (50 − 30) = 44.
    expect(f.weeks[0].intervals.toSignature).toEqual({ closed: 4, open: 0, median: 20, p90: 44 });
    // Signature → codes: 20, 5, 4 h and one open. Sorted 4, 5, 20: median 5; p90 at 1.8: 5 + 0.8 × 15 = 17.
    expect(f.weeks[0].intervals.toCoded).toEqual({ closed: 3, open: 1, median: 5, p90: 17 });
    // All done = the last step minus procedure end: 30 (codes at 10 + 20), 35 (30 + 5), 6 (2 + 4); one open.
    // Sorted 6, 30, 35: median 30; p90 at 1.8: 30 + 0.8 × 5 = 34.
    expect(f.weeks[0].intervals.toDone.closed).toBe(3);
    expect(f.weeks[0].intervals.toDone.open).toBe(1);
    expect(f.weeks[0].intervals.toDone.median).toBeCloseTo(30, 9);
    expect(f.weeks[0].intervals.toDone.p90).toBeCloseTo(34, 9);
    // Week 11: one signed (4 h), two unsigned left open, not dropped.
    expect(f.weeks[1].intervals.toSignature).toEqual({ closed: 1, open: 2, median: 4, p90: 4 });
    expect(f.totals.toSignature.closed).toBe(5);
    expect(f.totals.toSignature.open).toBe(2);
  });

  it('gives the same per physician, the late one first, and counts unsigned studies from their start or opening', async () => {
    const f = await figures('2003-03-03', '2003-03-16');
    expect(f.startBasis).toEqual({ 'procedure-end': 5, 'procedure-start': 1, opened: 1 });
    const late = f.physicians.find((p) => p.physicianId === lateId)!;
    // 10, 30, 50 h: median 30; p90 at 1.8: 30 + 0.8 × 20 = 46.
    expect(late.intervals.toSignature).toEqual({ closed: 3, open: 0, median: 30, p90: 46 });
    // Signature → EHR: 1, 2, 3 h: median 2; p90 at 1.8: 2 + 0.8 × 1 = 2.8.
    expect(late.intervals.toDelivered.median).toBe(2);
    expect(late.intervals.toDelivered.p90).toBeCloseTo(2.8, 9);
    const prompt = f.physicians.find((p) => p.physicianId === promptId)!;
    expect(prompt.studies).toBe(3);
    expect(prompt.overdue).toBe(1); // the study with only a start time, unsigned since 2003
    expect(prompt.intervals.toSignature).toEqual({ closed: 2, open: 1, median: 3, p90: 3.8 });
    const nobody = f.physicians.find((p) => p.physicianId === null)!;
    expect(nobody).toMatchObject({ name: 'No physician recorded', studies: 1, overdue: 1 });
    // Overdue first, then the slowest median.
    expect(f.physicians.map((p) => p.physicianId)).toEqual([promptId, null, lateId]);
  });

  it('reads the quality figures from what was signed', async () => {
    const q = (await figures('2003-03-03', '2003-03-16')).quality;
    expect(q).toMatchObject({
      signedStudies: 5,
      pressureStudies: 3,
      driftDocumentedStudies: 2,
      driftVessels: 2,
      driftOutsideVessels: 1, // 1.04 is outside 0.98–1.02 (the default drift window)
      thermoStudies: 2,
      thermoCompleteStudies: 1, // two resting injections fall short of three per state
      vessels: 5,
    });
    // The physiology core warns about the drift outside its window and the short injection set.
    expect(q.warnedVessels).toBe(2);
    expect(q.driftBins.filter((b) => b.vessels > 0).map((b) => [b.from, b.to, b.vessels])).toEqual([
      [0.99, 1.0, 1],
      [1.04, 1.05, 1],
    ]);
    expect(q.endotypes.map((m) => m.month)).toEqual(['2003-03']);
    expect(Object.values(q.endotypes[0].counts).reduce((a, b) => a + (b ?? 0), 0)).toBe(5);
  });

  it('counts weeks and day ranges in the lab time zone, across an ISO week-year boundary', async () => {
    await seedStudy({ operatorId: promptId, endedAt: at('2003-12-29T12:00:00Z'), signedAfterH: 1 });
    // Monday 5 January 2004 03:00 UTC is Sunday 4 January 22:00 in New York: ISO week 2004-W01 there, W02 in UTC.
    await seedStudy({ operatorId: promptId, endedAt: at('2004-01-05T03:00:00Z'), signedAfterH: 3 });
    const settings = await labSettings(db);
    const utc = await turnaroundFigures(db, { from: '2003-12-29', to: '2004-01-11' }, { ...settings, timeZone: 'UTC' });
    expect(utc.weeks.map((w) => [w.week, w.weekStart, w.studies])).toEqual([
      ['2004-W01', '2003-12-29', 1],
      ['2004-W02', '2004-01-05', 1],
    ]);
    const ny = await turnaroundFigures(db, { from: '2003-12-29', to: '2004-01-11' }, { ...settings, timeZone: 'America/New_York' });
    expect(ny.weeks.map((w) => [w.week, w.weekStart, w.studies])).toEqual([['2004-W01', '2003-12-29', 2]]);
    expect(ny.weeks[0].intervals.toSignature).toEqual({ closed: 2, open: 0, median: 2, p90: 2.8 });
    // The day range too: 4 January in New York holds the study, 4 January in UTC does not.
    expect((await turnaroundFigures(db, { from: '2004-01-04', to: '2004-01-04' }, { ...settings, timeZone: 'America/New_York' })).studies).toBe(1);
    expect((await turnaroundFigures(db, { from: '2004-01-04', to: '2004-01-04' }, { ...settings, timeZone: 'UTC' })).studies).toBe(0);
  });

  it('starts weeks and months at local midnight, and gives the same figures on one connection as on several', async () => {
    // Sunday 1 February 2004 02:00 UTC is Saturday 31 January 21:00 in New York; Monday 2 February
    // 03:00 UTC is Sunday 1 February 22:00 there. ISO 8601 weeks start on Monday.
    await seedStudy({ operatorId: promptId, endedAt: at('2004-02-01T02:00:00Z'), signedAfterH: 1, vessels: [visualOnly()] });
    await seedStudy({ operatorId: lateId, endedAt: at('2004-02-02T03:00:00Z'), signedAfterH: 5, vessels: [visualOnly()] });
    const settings = await labSettings(db);
    const range = { from: '2004-01-26', to: '2004-02-08' };
    const utc = await turnaroundFigures(db, range, { ...settings, timeZone: 'UTC' });
    expect(utc.weeks.map((w) => [w.week, w.weekStart, w.studies])).toEqual([
      ['2004-W05', '2004-01-26', 1],
      ['2004-W06', '2004-02-02', 1],
    ]);
    expect(utc.quality.endotypes.map((m) => m.month)).toEqual(['2004-02']);
    const ny = await turnaroundFigures(db, range, { ...settings, timeZone: 'America/New_York' });
    expect(ny.weeks.map((w) => [w.week, w.weekStart, w.studies])).toEqual([['2004-W05', '2004-01-26', 2]]);
    // percentile_cont of {1, 5}: median 1 + 0.5 × 4 = 3, 90th 1 + 0.9 × 4 = 4.6 (linear interpolation).
    expect(ny.weeks[0].intervals.toSignature).toEqual({ closed: 2, open: 0, median: 3, p90: 4.6 });
    expect(ny.quality.endotypes.map((m) => [m.month, Object.values(m.counts).reduce((a, b) => a + (b ?? 0), 0)])).toEqual([
      ['2004-01', 1],
      ['2004-02', 1],
    ]);
    // A pool of two runs the statements one after another in one transaction; a larger one at once.
    const small = createDataSource(process.env.DATABASE_URL!, 2);
    await small.initialize();
    try {
      const now = new Date();
      for (const timeZone of ['UTC', 'America/New_York']) {
        const wide = { from: '2003-03-01', to: '2004-02-29' };
        expect(await turnaroundFigures(small, wide, { ...settings, timeZone }, now)).toEqual(await turnaroundFigures(db, wide, { ...settings, timeZone }, now));
      }
    } finally {
      await small.destroy();
    }
  });

  it('counts the first hour of a day whose midnight happens twice in that day, week and month', async () => {
    // Cuba leaves summer time on the first Sunday of November at 0:00 standard time (01:00 summer time
    // back to 00:00), so on Sunday 1 November 2026 local midnight happens twice: 04:00 and 05:00 UTC
    // (IANA time zone database, northamerica, Rule Cuba [memory]). 04:30 UTC is 00:30 on 1 November there.
    const settings = { ...(await labSettings(db)), timeZone: 'America/Havana' };
    // Other tests share this database and may have studies near these days: compare before and after.
    const count = async (from: string, to: string) => (await turnaroundFigures(db, { from, to }, settings)).studies;
    const weeksOf = async () => Object.fromEntries((await turnaroundFigures(db, { from: '2026-10-19', to: '2026-11-08' }, settings)).weeks.map((w) => [w.week, w.studies]));
    const before = { nov1: await count('2026-11-01', '2026-11-01'), oct31: await count('2026-10-31', '2026-10-31'), weeks: await weeksOf() };
    await seedStudy({ operatorId: promptId, endedAt: at('2026-11-01T04:30:00Z'), signedAfterH: 2, vessels: [visualOnly()] });
    const [{ first, later }] = await db.query(
      `SELECT (timestamptz '2026-11-01T04:30:00Z' AT TIME ZONE 'America/Havana')::text AS first, (timestamp '2026-11-01 00:00' AT TIME ZONE 'America/Havana')::text AS later`,
    );
    expect(first).toBe('2026-11-01 00:30:00');
    expect(later).toBe('2026-11-01 05:00:00+00'); // the later midnight, which alone would leave the study in 31 October
    expect(await count('2026-11-01', '2026-11-01')).toBe(before.nov1 + 1);
    expect(await count('2026-10-31', '2026-10-31')).toBe(before.oct31);
    const range = await turnaroundFigures(db, { from: '2026-10-26', to: '2026-11-08' }, settings);
    // Sunday 1 November 2026 closes ISO week 2026-W44 (26 October – 1 November).
    expect(range.weeks.find((w) => w.week === '2026-W44')).toMatchObject({ weekStart: '2026-10-26' });
    const after = await weeksOf();
    expect(after['2026-W44']).toBe((before.weeks['2026-W44'] ?? 0) + 1);
    expect(after['2026-W43'] ?? 0).toBe(before.weeks['2026-W43'] ?? 0);
    expect(range.quality.endotypes.map((m) => m.month)).toContain('2026-11');
  });

  it('records each request for the figures with the range and the studies counted', async () => {
    const f = await figures('2003-03-03', '2003-03-16');
    const [row] = await db.query(`SELECT * FROM audit_event WHERE detail->>'view' = 'turnaround-figures' ORDER BY id DESC LIMIT 1`);
    expect(row).toMatchObject({ action: 'search', entity_type: 'study', outcome: 'success', actor_role: 'chief' });
    expect(row.detail).toEqual({ view: 'turnaround-figures', from: '2003-03-03', to: '2003-03-16', studies: f.studies });
    expect(f.studies).toBeGreaterThan(0);
  });

  it('answers 400 with the field for a bad range', async () => {
    for (const [query, pointer] of [
      ['', '/from'],
      ['from=2003-03-03', '/to'],
      ['from=2003-02-30&to=2003-03-03', '/from'],
      ['from=2003-03-03&to=2003-03-01', '/to'],
      ['from=1990-01-01&to=2003-03-01', '/to'],
    ] as const) {
      const response = await get(`/api/turnaround/figures?${query}`);
      expect(response.status, query).toBe(400);
      const body = await response.json();
      expect(body.errors.map((e: { pointer: string }) => e.pointer), query).toContain(pointer);
    }
    expect((await get('/api/turnaround/export?from=2003-03-03&to=nope')).status).toBe(400);
  });
});

describe('GET /api/turnaround/export', () => {
  it('writes every study of the range with open intervals empty and formula-like cells neutralised', async () => {
    const response = await get('/api/turnaround/export?from=2003-03-03&to=2003-03-16');
    expect(response.status).toBe(200);
    expect(response.headers.get('content-type')).toMatch(/^text\/csv/);
    expect(response.headers.get('content-disposition')).toContain('turnaround-2003-03-03-2003-03-16.csv');
    const lines = (await response.text()).trimEnd().split('\r\n');
    expect(lines[0]).toBe(
      'accession,state,clock_started_at,clock_starts_at,physician,signed_at,codes_reviewed_at,ehr_delivered_at,hours_to_signature,hours_signature_to_codes,hours_signature_to_ehr,hours_to_all_done,overdue,endotype',
    );
    expect(lines).toHaveLength(8);
    // OWASP "CSV Injection": a cell starting with = or @ gets a leading apostrophe.
    const hyperlink = lines.find((l) => l.includes('HYPERLINK'))!;
    expect(hyperlink.startsWith(`"'=HYPERLINK(""x"")-${tag}"`)).toBe(true);
    expect(hyperlink).toContain(`'=Dr Prompt ${tag}`);
    const opened = lines.find((l) => l.includes(',opened,'))!;
    expect(opened.split(',').slice(1, 4)).toEqual(['draft', '2003-03-13T09:00:00.000Z', 'opened']);
    expect(opened.split(',').slice(8, 13)).toEqual(['', '', '', '', 'yes']);
    const third = lines.find((l) => l.includes('2003-03-05T10:00:00.000Z'))!.split(',');
    expect(third.slice(8, 12)).toEqual(['50.00', '', '3.00', '']);
  });
});

describe('GET /api/turnaround/awaiting-signature', () => {
  it('lists unsigned studies with their age and owner, including one with no procedure time', async () => {
    const response = await get('/api/turnaround/awaiting-signature');
    expect(response.status).toBe(200);
    const body = await response.json();
    expect(body.targetHours).toBe(24);
    const pending = body.items.find((i: { id: string }) => i.id === pendingStudy.id);
    expect(pending).toMatchObject({ overdue: true, ownerId: lateId, ownerName: `Dr Late ${tag}`, startBasis: 'procedure-end' });
    expect(pending.hoursWaiting).toBeGreaterThan(29.9);
    expect(body.items.some((i: { startBasis: string; accession: string }) => i.startBasis === 'opened' && i.accession.startsWith(`TA-${tag}`))).toBe(true);
    expect(body.overdueTotal).toBeGreaterThanOrEqual(3);
  });
});

describe('overdue notices', () => {
  const quiet = new Logger(() => () => undefined);

  it('mails the physician and the chiefs once, however often the check runs, and not again after a restart', async () => {
    const physician = await user(`Dr Overdue ${tag}`, 'physician', `overdue-${tag.toLowerCase()}@hospital.example`);
    const chief = await user(`Chief ${tag}`, 'chief', `chief-${tag.toLowerCase()}@hospital.example`);
    const study = await seedStudy({ operatorId: physician, endedAt: new Date(Date.now() - 25 * H) });
    const recent = await seedStudy({ operatorId: physician, endedAt: new Date(Date.now() - 2 * H) });
    const settings = await labSettings(db);
    // A port the system chooses: a random one could already be taken by another connection.
    const smtp = await startFakeSmtp({ port: 0, httpPort: 0 });
    const smtpPort = smtp.port;
    const taskList = {
      'queue-overdue-notices': queueOverdueNoticesTask(db),
      'send-overdue-notice': sendOverdueNoticeTask(db, { host: '127.0.0.1', port: smtpPort, from: 'Isobar <isobar@hospital.example>', publicUrl: 'https://isobar.hospital.example' }),
    };
    try {
      // The scheduled task, twice: the study is noticed once.
      const first = await queueOverdueNotices(db, settings);
      expect(first).toContain(study.id);
      expect(first).not.toContain(recent.id);
      expect(await queueOverdueNotices(db, settings)).not.toContain(study.id);
      await runOnce({ connectionString: process.env.DATABASE_URL!, taskList, logger: quiet });
      const mails = smtp.caught.filter((m) => m.raw.includes(study.accession));
      expect(mails).toHaveLength(1);
      expect(mails[0].to).toEqual(expect.arrayContaining([`chief-${tag.toLowerCase()}@hospital.example`, `overdue-${tag.toLowerCase()}@hospital.example`]));
      expect(mails[0].raw).toMatch(new RegExp(`^To: overdue-${tag.toLowerCase()}@hospital.example`, 'm'));
      // The body is quoted-printable: soft line breaks (= at a line end) are removed before reading it.
      expect(mails[0].raw.replace(/=\r?\n/g, '')).toContain(`https://isobar.hospital.example/studies/${study.id}`);
      expect(mails[0].raw).not.toContain('Testperson'); // no patient name
      const [notice] = await db.query(`SELECT sent_at, recipients FROM overdue_notice WHERE study_id = $1`, [study.id]);
      expect(notice.sent_at).not.toBeNull();
      expect(notice.recipients).toBe(mails[0].to.length);

      // A restart: a fresh worker runs the scheduled check again and works the queue — nothing more is sent.
      await runOnce({ connectionString: process.env.DATABASE_URL!, taskList, logger: quiet });
      await taskList['queue-overdue-notices']({}, {} as never);
      await runOnce({ connectionString: process.env.DATABASE_URL!, taskList, logger: quiet });
      expect(smtp.caught.filter((m) => m.raw.includes(study.accession))).toHaveLength(1);
      const [{ n }] = await db.query(`SELECT count(*)::int AS n FROM overdue_notice WHERE study_id = $1`, [study.id]);
      expect(n).toBe(1);
      expect(chief).toBeTruthy();
    } finally {
      await smtp.close();
    }
  });

  it('is scheduled by the job queue every five minutes', () => {
    const [item] = parseCronItems(overdueCronItems);
    expect(item.task).toBe('queue-overdue-notices');
    const minutes = Array.from({ length: 60 }, (_, min) => min).filter((min) => item.match({ min, hour: 3, date: 14, month: 5, dow: 3 }));
    expect(minutes).toEqual([0, 5, 10, 15, 20, 25, 30, 35, 40, 45, 50, 55]);
  });
});
