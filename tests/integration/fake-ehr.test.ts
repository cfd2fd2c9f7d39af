import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest';
import type { Bundle, DiagnosticReport, Observation, OperationOutcome } from 'fhir/r4';
import { toReportBundle } from '../../fhir/report-bundle';
import { EhrClient } from '../../server/ehr/ehr-client';
import { EHR_WRITE_SCOPES, startFakeEhr, type FakeEhr } from '../../server/fakes/ehr';
import { startFakeIdp, type FakeIdp } from '../../server/fakes/identity-provider';
import { caseA, reportInput } from '../unit/fhir/fixtures';

// The EHR's base URL must be known before the identity provider registers it as an audience, so the
// EHR listens on a port picked first.
let idp: FakeIdp;
let ehr: FakeEhr;
let client: EhrClient;
const secret = 'test-ehr-client-secret';

async function freePort(): Promise<number> {
  const { createServer } = await import('node:net');
  return new Promise((resolve) => {
    const s = createServer().listen(0, '127.0.0.1', () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
  });
}

beforeAll(async () => {
  const port = await freePort();
  const audience = `http://127.0.0.1:${port}/fhir`;
  idp = await startFakeIdp({
    port: 0,
    clientId: 'isobar',
    clientSecret: 'x',
    appUrl: 'http://127.0.0.1:1',
    serviceClients: [
      { clientId: 'isobar-ehr', clientSecret: secret, audience, scope: EHR_WRITE_SCOPES.join(' ') },
      { clientId: 'read-only', clientSecret: secret, audience, scope: 'system/Observation.read' },
    ],
  });
  ehr = await startFakeEhr({ port, issuer: idp.issuer });
  client = new EhrClient({ fhirBaseUrl: ehr.fhirBaseUrl, issuer: idp.issuer, clientId: 'isobar-ehr', clientSecret: secret, scope: EHR_WRITE_SCOPES.join(' '), timeoutMs: 5000 });
});
afterAll(async () => {
  await ehr?.close();
  await idp?.close();
});
beforeEach(() => ehr.setFault('none'));

const post = (body: unknown, token?: string) =>
  fetch(ehr.fhirBaseUrl, {
    method: 'POST',
    headers: { 'content-type': 'application/fhir+json', ...(token ? { authorization: `Bearer ${token}` } : {}) },
    body: JSON.stringify(body),
  });

describe('the fake EHR accepts a report bundle from Isobar', () => {
  it('stores the report, one observation per index, the patient and the encounter, and answers a transaction-response', async () => {
    const bundle = toReportBundle(reportInput({ vessels: [caseA] }, { report: { id: 'r-accept', version: 1, status: 'final', signedAt: '2025-03-04T15:20:00+01:00', signer: { name: 'Dr A' } } }));
    const result = await client.sendTransaction(bundle);
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    // FHIR R4 http.html#transaction-response: one response entry per request entry, in order, 201 for created.
    expect(result.response.type).toBe('transaction-response');
    expect(result.response.entry).toHaveLength(bundle.entry!.length);
    expect(result.response.entry!.every((e) => e.response?.status === '201 Created')).toBe(true);

    const reports = (ehr.resources('DiagnosticReport') as DiagnosticReport[]).filter((r) => r.identifier?.some((i) => i.value === 'r-accept'));
    expect(reports).toHaveLength(1);
    // References inside the bundle were resolved to the ids the server assigned.
    const patientId = ehr.resources('Patient').find((p) => JSON.stringify(p).includes('MRN-000123'))!.id;
    expect(reports[0].subject?.reference).toBe(`Patient/${patientId}`);
    expect(reports[0].result).toHaveLength(bundle.entry!.filter((e) => e.resource?.resourceType === 'Observation').length);
    const ffr = ehr.resources('Observation').find((o) => (o as Observation).identifier?.[0].value === 'r-accept/vessel/vessel-lad/ffr') as Observation;
    // Case A (hand-computed from the FFR formula): 72/90 = 0.80.
    expect(ffr.valueQuantity?.value).toBe(0.8);
  });

  it('recognises a resend by Bundle.identifier and answers what it answered the first time', async () => {
    const bundle = toReportBundle(reportInput({ vessels: [caseA] }, { report: { id: 'r-resend', version: 1, status: 'final', signedAt: '2025-03-04T15:20:00+01:00', signer: { name: 'Dr A' } } }));
    const first = await client.sendTransaction(bundle);
    const again = await client.sendTransaction(toReportBundle(reportInput({ vessels: [caseA] }, { report: { id: 'r-resend', version: 1, status: 'final', signedAt: '2025-03-04T15:20:00+01:00', signer: { name: 'Dr A' } } })));
    expect(first.ok && again.ok).toBe(true);
    if (!first.ok || !again.ok) return;
    expect(again.response).toEqual(first.response);
    expect(ehr.received.filter((r) => r.identifier.endsWith('|r-resend/v1')).map((r) => r.outcome)).toEqual(['accepted', 'resend']);
    expect((ehr.resources('DiagnosticReport') as DiagnosticReport[]).filter((r) => r.identifier?.some((i) => i.value === 'r-resend'))).toHaveLength(1);
  });

  it('an addendum updates the same report and observations (conditional update by identifier), never a second report', async () => {
    const signer = { name: 'Dr A' };
    const v1 = toReportBundle(reportInput({ vessels: [caseA] }, { report: { id: 'r-amend', version: 1, status: 'final', signedAt: '2025-03-04T15:20:00+01:00', signer } }));
    const v2 = toReportBundle(
      reportInput({ vessels: [caseA] }, { report: { id: 'r-amend', version: 2, status: 'amended', previousVersion: 1, signedAt: '2025-03-05T09:00:00+01:00', signer }, conclusion: 'Amended impression.' }),
    );
    expect((await client.sendTransaction(v1)).ok).toBe(true);
    const second = await client.sendTransaction(v2);
    expect(second.ok).toBe(true);
    if (!second.ok) return;
    const reports = (ehr.resources('DiagnosticReport') as DiagnosticReport[]).filter((r) => r.identifier?.some((i) => i.value === 'r-amend'));
    expect(reports).toHaveLength(1);
    expect(reports[0].status).toBe('amended');
    expect(reports[0].conclusion).toBe('Amended impression.');
    expect(reports[0].meta?.versionId).toBe('2');
    // The patient and encounter were matched (200), the report and observations updated (200): nothing created.
    expect(second.response.entry!.map((e) => e.response?.status)).toEqual(second.response.entry!.map(() => '200 OK'));
    const observations = (ehr.resources('Observation') as Observation[]).filter((o) => o.identifier?.[0].value?.startsWith('r-amend/'));
    expect(observations.length).toBe(v2.entry!.filter((e) => e.resource?.resourceType === 'Observation').length);
    expect(observations.every((o) => o.status === 'amended')).toBe(true);
  });
});

describe('the fake EHR refuses what a hospital EHR would refuse', () => {
  const valid = () => toReportBundle(reportInput({ vessels: [caseA] }, { report: { id: 'r-refuse', version: 1, status: 'final', signedAt: '2025-03-04T15:20:00+01:00', signer: { name: 'Dr A' } } }));

  it('401 with an OperationOutcome without a bearer token, or with a forged one', async () => {
    const none = await post(valid());
    expect(none.status).toBe(401);
    expect(none.headers.get('www-authenticate')).toMatch(/^Bearer /);
    expect(((await none.json()) as OperationOutcome).resourceType).toBe('OperationOutcome');
    const token = await client.accessToken();
    const [h, p] = token.split('.');
    const forged = `${h}.${p}.${Buffer.from('not the signature').toString('base64url')}`;
    const refused = await post(valid(), forged);
    expect(refused.status).toBe(401);
    expect(((await refused.json()) as OperationOutcome).issue[0].diagnostics).toBe('bad signature');
  });

  it('403 for a token without the write scopes', async () => {
    const reader = new EhrClient({ fhirBaseUrl: ehr.fhirBaseUrl, issuer: idp.issuer, clientId: 'read-only', clientSecret: secret, scope: 'system/Observation.read' });
    const result = await reader.sendTransaction(valid());
    expect(result).toMatchObject({ ok: false, kind: 'rejected', status: 403 });
  });

  it('a wrong client secret is refused by the identity provider, not retried as transient', async () => {
    const wrong = new EhrClient({ fhirBaseUrl: ehr.fhirBaseUrl, issuer: idp.issuer, clientId: 'isobar-ehr', clientSecret: 'wrong', scope: EHR_WRITE_SCOPES.join(' ') });
    expect(await wrong.sendTransaction(valid())).toMatchObject({ ok: false, kind: 'rejected' });
  });

  it('400 with the issue located when the bundle breaks FHIR R4 structure', async () => {
    const bundle = valid();
    (bundle.entry![2].resource as unknown as Record<string, unknown>).valueQuantity = 'not a quantity';
    const result = await client.sendTransaction(bundle);
    expect(result).toMatchObject({ ok: false, kind: 'rejected', status: 400 });
    if (result.ok) return;
    expect(result.outcome?.issue.some((i) => i.expression?.some((e) => e.startsWith('Bundle.entry[2].resource.value')))).toBe(true);
  });

  it('422 for a status, interpretation or UCUM unit outside its code system', async () => {
    const bundle = valid();
    const obs = bundle.entry![2].resource as Observation;
    obs.status = 'done' as Observation['status'];
    obs.interpretation = [{ coding: [{ system: 'http://terminology.hl7.org/CodeSystem/v3-ObservationInterpretation', code: 'BORDER' }] }];
    obs.valueQuantity = { ...obs.valueQuantity, code: 'mmHg' };
    const result = await client.sendTransaction(bundle);
    expect(result).toMatchObject({ ok: false, kind: 'rejected', status: 422 });
    if (result.ok) return;
    const text = result.outcome!.issue.map((i) => i.diagnostics).join('\n');
    expect(text).toContain('"done"');
    expect(text).toContain('"BORDER"');
    expect(text).toContain('"mmHg" is not a valid UCUM unit code');
  });

  it('400 for a collection bundle (only transactions are processed)', async () => {
    const bundle = toReportBundle({ ...reportInput(), bundleType: 'collection' });
    expect(await client.sendTransaction(bundle)).toMatchObject({ ok: false, kind: 'rejected', status: 400 });
  });

  it('409 when a different bundle arrives under an identifier already accepted', async () => {
    const first = valid();
    expect((await client.sendTransaction(first)).ok).toBe(true);
    const changed = valid();
    (changed.entry!.find((e) => e.resource?.resourceType === 'DiagnosticReport')!.resource as DiagnosticReport).conclusion = 'Changed without a new version.';
    expect(await client.sendTransaction(changed)).toMatchObject({ ok: false, kind: 'rejected', status: 409 });
  });
});

describe('faults the delivery must survive are reported as transient', () => {
  const bundle = () => toReportBundle(reportInput({ vessels: [caseA] }, { report: { id: 'r-fault', version: 1, status: 'final', signedAt: '2025-03-04T15:20:00+01:00', signer: { name: 'Dr A' } } }));

  it('503 while the EHR is unavailable, then accepted once it is back', async () => {
    ehr.setFault('unavailable');
    expect(await client.sendTransaction(bundle())).toMatchObject({ ok: false, kind: 'transient', status: 503 });
    ehr.setFault('none');
    expect((await client.sendTransaction(bundle())).ok).toBe(true);
  });

  it('a hanging EHR times out (client timeout 2 s)', async () => {
    const impatient = new EhrClient({ fhirBaseUrl: ehr.fhirBaseUrl, issuer: idp.issuer, clientId: 'isobar-ehr', clientSecret: secret, scope: EHR_WRITE_SCOPES.join(' '), timeoutMs: 2000 });
    await impatient.accessToken();
    ehr.setFault('hang');
    const started = Date.now();
    const result = await impatient.sendTransaction(bundle());
    expect(result).toMatchObject({ ok: false, kind: 'transient' });
    expect(Date.now() - started).toBeGreaterThanOrEqual(1900);
    expect(Date.now() - started).toBeLessThan(10_000);
  });

  it('a dropped connection', async () => {
    ehr.setFault('drop');
    expect(await client.sendTransaction(bundle())).toMatchObject({ ok: false, kind: 'transient' });
  });

  it('an EHR that is not listening at all', async () => {
    const nowhere = new EhrClient({ fhirBaseUrl: 'http://127.0.0.1:1/fhir', issuer: idp.issuer, clientId: 'isobar-ehr', clientSecret: secret, scope: EHR_WRITE_SCOPES.join(' '), timeoutMs: 2000 });
    // The identity provider has no audience for this URL, so ask for the registered one.
    const viaAudience = new EhrClient({ fhirBaseUrl: 'http://127.0.0.1:1/fhir', audience: ehr.audience, issuer: idp.issuer, clientId: 'isobar-ehr', clientSecret: secret, scope: EHR_WRITE_SCOPES.join(' '), timeoutMs: 2000 });
    expect(await nowhere.sendTransaction(bundle())).toMatchObject({ ok: false, kind: 'rejected' });
    expect(await viaAudience.sendTransaction(bundle())).toMatchObject({ ok: false, kind: 'transient' });
  });
});

describe('reading back', () => {
  it('finds the report by its identifier (search) and reads it by id', async () => {
    const token = await client.accessToken();
    const search = await fetch(`${ehr.fhirBaseUrl}/DiagnosticReport?identifier=${encodeURIComponent('https://isobar.example/fhir/sid/report|r-accept')}`, { headers: { authorization: `Bearer ${token}` } });
    const found = (await search.json()) as Bundle;
    expect(found.total).toBe(1);
    const id = found.entry![0].resource!.id!;
    const read = await fetch(`${ehr.fhirBaseUrl}/DiagnosticReport/${id}`, { headers: { authorization: `Bearer ${token}` } });
    expect(read.status).toBe(200);
    expect(((await read.json()) as DiagnosticReport).presentedForm?.[0].contentType).toBe('application/pdf');
  });
});
