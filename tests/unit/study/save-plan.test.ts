import { describe, expect, it } from 'vitest';
import { decideOnSaveError, fieldPathOf, maxSaveRetries, planSave, saveRetryDelay, shouldRetrySave, type SaveFailure } from '../../../components/study/save-plan';
import { ApiError, shouldRetryRead } from '../../../components/data/api';
import { emptyStudyCoding } from '../../../shared/coding';
import { emptyDetails, emptyFindings, emptySetup, emptyVasoreactivity, emptyVessel, type StudyRecord, type StudySections } from '../../../shared/study/schema';

const lad = '11111111-1111-4111-8111-111111111111';
const rca = '22222222-2222-4222-8222-222222222222';

const sections = (over: Partial<StudySections> = {}): StudySections => ({
  patient: { mrn: 'M1', familyName: 'Aster', givenName: 'Ada', birthDate: '1960-01-01', sex: 'female' },
  details: emptyDetails(),
  setup: emptySetup(),
  vessels: [],
  vasoreactivity: emptyVasoreactivity(),
  findings: emptyFindings(),
  coding: emptyStudyCoding(),
  ...over,
});

describe('planSave: only the field that cannot be saved stays on the device', () => {
  // Pressure limits are the record's own schema (a pressure cannot be negative: common practice).
  it('sends a vessel with a negative pressure minus that pressure, and names the held field', () => {
    const server = sections({ vessels: [emptyVessel(lad, 'LAD')] });
    const mine = sections({ vessels: [{ ...emptyVessel(lad, 'LAD'), restPa: -5, restPd: 80, restTransit: [0.9, 0.8] }] });
    const plan = planSave(mine, server);
    expect(plan.held).toEqual(['/vessels/0/restPa']);
    expect(plan.blocked).toEqual([]);
    expect(plan.send.vessels).toEqual([{ ...emptyVessel(lad, 'LAD'), restPa: null, restPd: 80, restTransit: [0.9, 0.8] }]);
  });

  const cases: { name: string; server: StudySections; mine: StudySections; held: string[]; sends: string[] }[] = [
    { name: 'nothing changed', server: sections(), mine: sections(), held: [], sends: [] },
    { name: 'a valid change', server: sections(), mine: sections({ setup: { ...emptySetup(), heparinUnits: 5000 } }), held: [], sends: ['setup'] },
    {
      name: 'text in a number box of a new row: the row goes without it',
      server: sections(),
      mine: sections({ vessels: [{ ...emptyVessel(lad, 'LAD'), restPa: Number.NaN, restPd: 80 }] }),
      held: ['/vessels/0/restPa'],
      sends: ['vessels'],
    },
    {
      name: 'a bad transit time holds that list only',
      server: sections({ vessels: [emptyVessel(lad, 'LAD')] }),
      mine: sections({ vessels: [{ ...emptyVessel(lad, 'LAD'), restTransit: [0.9, Number.NaN], hyperemiaPd: 70 }] }),
      held: ['/vessels/0/restTransit'],
      sends: ['vessels'],
    },
    {
      name: 'the only change is the bad field: nothing to send',
      server: sections(),
      mine: sections({ setup: { ...emptySetup(), heparinUnits: -1 } }),
      held: ['/setup/heparinUnits'],
      sends: [],
    },
    {
      name: 'an end before its start holds the end only',
      server: sections(),
      mine: sections({ details: { ...emptyDetails(), procedureStartedAt: '2026-12-01T10:00:00.000Z', procedureEndedAt: '2026-12-01T09:00:00.000Z' } }),
      held: ['/details/procedureEndedAt'],
      sends: ['details'],
    },
  ];
  it.each(cases)('$name', ({ server, mine, held, sends }) => {
    const plan = planSave(mine, server);
    expect(plan.held).toEqual(held);
    expect(Object.keys(plan.send)).toEqual(sends);
  });

  it('matches rows by id when putting a held field back', () => {
    const server = sections({ vessels: [{ ...emptyVessel(rca, 'RCA'), restPa: 90 }, { ...emptyVessel(lad, 'LAD'), restPa: 95 }] });
    const mine = sections({ vessels: [{ ...emptyVessel(lad, 'LAD'), restPa: -1 }, { ...emptyVessel(rca, 'RCA'), restPa: 91 }] });
    const plan = planSave(mine, server);
    expect(plan.send.vessels).toEqual([{ ...emptyVessel(lad, 'LAD'), restPa: 95 }, { ...emptyVessel(rca, 'RCA'), restPa: 91 }]);
  });

  it('holds a field the server refused until it changes', () => {
    const server = sections();
    const mine = sections({ patient: { ...sections().patient, givenName: 'Adelheid' }, findings: { ...emptyFindings(), impression: 'Normal' } });
    const refused = new Map([['/patient/givenName', JSON.stringify('Adelheid')]]);
    const plan = planSave(mine, server, refused);
    expect(plan.held).toEqual(['/patient/givenName']);
    expect(Object.keys(plan.send)).toEqual(['findings']);
    const changed = sections({ patient: { ...sections().patient, givenName: 'Adele' } });
    expect(Object.keys(planSave(changed, server, refused).send)).toEqual(['patient']);
  });

  it('cuts error paths to the field a person edits', () => {
    const s = sections({ vessels: [{ ...emptyVessel(lad, 'LAD'), restTransit: [1, 2] }] });
    expect(fieldPathOf(s, ['vessels', 0, 'restTransit', 1])).toEqual(['vessels', 0, 'restTransit']);
    expect(fieldPathOf(s, ['setup', 'heparinUnits'])).toEqual(['setup', 'heparinUnits']);
  });
});

const current = { id: 's', version: 4 } as unknown as StudyRecord;
const stale = 'https://isobar.example/problems/stale-version';

describe('decideOnSaveError', () => {
  // HTTP status meanings: RFC 9110 §15; problem details: RFC 9457.
  const cases: { name: string; failure: SaveFailure; kind: string; reason?: string }[] = [
    { name: 'no answer at all', failure: { status: 0 }, kind: 'retry' },
    { name: 'server fault (RFC 9110 §15.6)', failure: { status: 503 }, kind: 'retry' },
    { name: 'too many requests (RFC 6585 §4)', failure: { status: 429 }, kind: 'retry' },
    { name: 'stale version with the current record', failure: { status: 409, problem: { type: stale, current } }, kind: 'stale' },
    { name: 'field errors', failure: { status: 422, problem: { errors: [{ pointer: '/setup/heparinUnits', detail: 'x' }] } }, kind: 'fields' },
    { name: 'conflict with field errors (an MRN of another patient)', failure: { status: 409, problem: { type: 'x/mrn-taken', errors: [{ pointer: '/patient/mrn', detail: 'x' }] } }, kind: 'fields' },
    { name: 'signed out (RFC 9110 §15.5.2)', failure: { status: 401 }, kind: 'stop', reason: 'signed-out' },
    { name: 'forbidden (RFC 9110 §15.5.4)', failure: { status: 403 }, kind: 'stop', reason: 'forbidden' },
    { name: 'not found (RFC 9110 §15.5.5)', failure: { status: 404 }, kind: 'stop', reason: 'gone' },
    { name: 'signed meanwhile', failure: { status: 409, problem: { type: 'x/study-signed' } }, kind: 'stop', reason: 'signed' },
    { name: 'another conflict', failure: { status: 409, problem: { type: 'x/other' } }, kind: 'stop', reason: 'refused' },
    { name: 'a 400 without field errors', failure: { status: 400 }, kind: 'stop', reason: 'refused' },
  ];
  it.each(cases)('$name → $kind', ({ failure, kind, reason }) => {
    const d = decideOnSaveError(failure);
    expect(d.kind).toBe(kind);
    if (reason) expect(d.kind === 'stop' && d.reason).toBe(reason);
  });
});

describe('retries', () => {
  it.each([
    [0, true],
    [500, true],
    [502, true],
    [408, true],
    [400, false],
    [401, false],
    [403, false],
    [404, false],
    [409, false],
    [422, false],
  ])('a save that failed with %i is retried: %s', (status, retried) => {
    expect(shouldRetrySave(7, { status })).toBe(retried);
  });

  it('stops retrying a transient failure on its own after a bounded number of tries', () => {
    expect(shouldRetrySave(0, { status: 503 })).toBe(true);
    expect(shouldRetrySave(maxSaveRetries - 1, { status: 503 })).toBe(true);
    expect(shouldRetrySave(maxSaveRetries, { status: 503 })).toBe(false);
    expect(shouldRetrySave(maxSaveRetries + 50, { status: 0 })).toBe(false);
    const totalWait = Array.from({ length: maxSaveRetries }, (_, i) => saveRetryDelay(i)).reduce((a, b) => a + b, 0);
    expect(totalWait).toBeLessThanOrEqual(60_000);
  });

  it('waits 1, 2, 4, then 5 s between tries', () => {
    expect([0, 1, 2, 3, 10].map(saveRetryDelay)).toEqual([1000, 2000, 4000, 5000, 5000]);
  });

  it.each([
    [403, 0, false],
    [404, 0, false],
    [401, 0, false],
    [0, 0, true],
    [500, 1, true],
    [500, 2, false],
  ])('reading a study that failed with %i after %i failures tries again: %s', (status, count, again) => {
    expect(shouldRetryRead(count, new ApiError({ type: 'about:blank', title: 't', status }))).toBe(again);
  });
});
