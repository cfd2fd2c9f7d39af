import type { AuditEvent, AuditEventEntity, Bundle, BundleEntry, Coding } from 'fhir/r4';
import { DICOM_DCM } from './codes';
import { urnUuid } from './uuid';

/**
 * Isobar's audit trail as FHIR R4 AuditEvent resources (http://hl7.org/fhir/R4/auditevent.html).
 * Pure: the caller reads the rows and streams the Bundle text this module writes.
 *
 * Bindings (FHIR R4 AuditEvent):
 * - `type` (extensible, value set audit-event-type): DICOM PS3.16 CID 400 "Audit Event ID";
 * - `subtype` (extensible, audit-event-sub-type): DICOM PS3.16 CID 401 "Audit Event Type Code" for
 *   login/logout, FHIR restful-interaction for reads, searches and changes of records; plus Isobar's
 *   own action code, so a receiver can tell a signature from another change;
 * - `action` (required, audit-event-action): C create, R read/view/print, U update, D delete,
 *   E execute (a system function: log-on, a query or search);
 * - `outcome` (required, audit-event-outcome): 0 success, 4 minor failure, 8 serious failure,
 *   12 major failure;
 * - `source.type` (security-source-type), `entity.type` (audit-entity-type), `entity.role`
 *   (object-role), `agent.network.type` (network-type).
 */

/** Code systems of the bindings above (FHIR R4 terminology). */
export const AUDIT_SYSTEMS = {
  dicom: DICOM_DCM,
  restfulInteraction: 'http://hl7.org/fhir/restful-interaction',
  securitySourceType: 'http://terminology.hl7.org/CodeSystem/security-source-type',
  entityType: 'http://terminology.hl7.org/CodeSystem/audit-entity-type',
  objectRole: 'http://terminology.hl7.org/CodeSystem/object-role',
  /** Isobar's action codes (shared/audit/trail.ts), as an extra subtype. */
  isobarAction: 'https://isobar.example/fhir/CodeSystem/audit-action',
} as const;

/** Identifier systems of what Isobar names in an event: its users, its audit rows, its records by kind. */
export const AUDIT_IDENTIFIER_SYSTEMS = {
  user: 'https://isobar.example/fhir/sid/user',
  auditEvent: 'https://isobar.example/fhir/sid/audit-event',
  record: (entityType: string) => `https://isobar.example/fhir/sid/${entityType}`,
} as const;

const dcm = (code: string, display: string): Coding => ({ system: DICOM_DCM, code, display });

/** AuditEvent.type: DICOM PS3.16 CID 400 (the codes FHIR R4's audit-event-type value set takes from DICOM). */
export const auditEventTypes = {
  auditLogUsed: dcm('110101', 'Audit Log Used'),
  export: dcm('110106', 'Export'),
  patientRecord: dcm('110110', 'Patient Record'),
  securityAlert: dcm('110113', 'Security Alert'),
  userAuthentication: dcm('110114', 'User Authentication'),
  /** FHIR R4 audit-event-type "RESTful Operation": a read or change of a record that holds no patient data. */
  rest: { system: 'http://terminology.hl7.org/CodeSystem/audit-event-type', code: 'rest', display: 'RESTful Operation' } as Coding,
} as const;

/** AuditEvent.subtype: DICOM PS3.16 CID 401 for sign-in and sign-out. */
export const auditEventSubtypes = {
  login: dcm('110122', 'Login'),
  logout: dcm('110123', 'Logout'),
} as const;

const rest = (code: string): Coding => ({ system: AUDIT_SYSTEMS.restfulInteraction, code, display: code });
/** AuditEvent.subtype for reads and changes of records: FHIR R4 restful-interaction (its displays are its codes). */
const restfulSubtype: Record<string, Coding> = {
  read: rest('read'),
  search: rest('search-type'),
  create: rest('create'),
  update: rest('update'),
  delete: rest('delete'),
};

/** The fields of an audit row this mapping reads (see server/audit/audit.ts). */
export interface AuditRecord {
  id: string;
  recordedAt: Date;
  actorUserId: string | null;
  actorName: string | null;
  actorRole: string | null;
  action: string;
  /** Words for the action (Isobar's label), for the subtype's display. */
  actionLabel?: string;
  entityType: string | null;
  entityId: string | null;
  /** Words for the record acted on ("Aster, Ada · MRN … · ACC-…"). */
  target?: string | null;
  clientAddress: string | null;
  outcome: 'success' | 'failure' | 'denied';
  detail?: Record<string, unknown> | null;
  /** The patient the event is about, when known (through the study). */
  patient?: { mrn: string; name: string | null } | null;
}

export interface AuditEventContext {
  /** The hospital's MRN identifier system (the EHR's). */
  patientIdSystem: string;
  /** Names the source that observed the events (AuditEvent.source.observer.display). */
  observer?: string;
}

const authentication = new Set(['sign-in', 'sign-in-failed', 'sign-out']);
/** Actions that change a study's state in the signing workflow (no FHIR restful equivalent). */
const workflowChange = new Set(['mark-ready', 'send-back', 'open-addendum', 'discard-addendum']);
/** Entity types that hold patient data. */
const patientData = new Set(['study', 'study-coding', 'code-suggestions', 'attachment', 'report-delivery', 'patient']);

export function eventTypeOf(r: Pick<AuditRecord, 'action' | 'entityType'>): Coding {
  if (authentication.has(r.action)) return auditEventTypes.userAuthentication;
  if (r.action === 'access-denied') return auditEventTypes.securityAlert;
  if (r.entityType === 'audit-event') return auditEventTypes.auditLogUsed;
  if (r.action === 'export') return auditEventTypes.export;
  if (r.entityType && patientData.has(r.entityType)) return auditEventTypes.patientRecord;
  return auditEventTypes.rest;
}

/** AuditEvent.action (audit-event-action). */
export function actionCodeOf(action: string): NonNullable<AuditEvent['action']> {
  switch (action) {
    case 'create':
    case 'sign':
    case 'sign-addendum':
      // A signature creates a report version.
      return 'C';
    case 'read':
    case 'export':
      return 'R';
    case 'update':
      return 'U';
    case 'delete':
      return 'D';
    default:
      return workflowChange.has(action) ? 'U' : 'E';
  }
}

/**
 * AuditEvent.outcome (audit-event-outcome): 0 success; 4 minor failure, a request refused or failed
 * and the person can act on it (wrong sign-in, refused access, a stale edit); 8 serious failure, a
 * task the system ran on its own failed. 12 (major failure) is not recorded by Isobar.
 */
export function outcomeCodeOf(r: Pick<AuditRecord, 'outcome' | 'actorRole'>): NonNullable<AuditEvent['outcome']> {
  if (r.outcome === 'success') return '0';
  return r.outcome === 'failure' && r.actorRole === 'system' ? '8' : '4';
}

function subtypeOf(r: AuditRecord): Coding[] {
  const codes: Coding[] = [];
  if (r.action === 'sign-in' || r.action === 'sign-in-failed') codes.push(auditEventSubtypes.login);
  else if (r.action === 'sign-out') codes.push(auditEventSubtypes.logout);
  else if (restfulSubtype[r.action] && r.entityType) codes.push(restfulSubtype[r.action]);
  codes.push({ system: AUDIT_SYSTEMS.isobarAction, code: r.action, ...(r.actionLabel ? { display: r.actionLabel } : {}) });
  return codes;
}

function entitiesOf(r: AuditRecord, ctx: AuditEventContext): AuditEventEntity[] {
  const entities: AuditEventEntity[] = [];
  if (r.patient) {
    entities.push({
      what: { identifier: { system: ctx.patientIdSystem, value: r.patient.mrn }, ...(r.patient.name ? { display: r.patient.name } : {}) },
      type: { system: AUDIT_SYSTEMS.entityType, code: '1', display: 'Person' },
      role: { system: AUDIT_SYSTEMS.objectRole, code: '1', display: 'Patient' },
    });
  }
  if (r.entityType || r.detail) {
    const detail = r.detail ? JSON.stringify(r.detail) : null;
    entities.push({
      ...(r.entityType
        ? {
            what: {
              ...(r.entityId ? { identifier: { system: AUDIT_IDENTIFIER_SYSTEMS.record(r.entityType), value: r.entityId } } : {}),
              display: r.target ?? r.entityType,
            },
          }
        : {}),
      type: { system: AUDIT_SYSTEMS.entityType, code: '2', display: 'System Object' },
      ...(r.entityType === 'user' ? { role: { system: AUDIT_SYSTEMS.objectRole, code: '6', display: 'User' } } : {}),
      // What was asked for, the filters of a search, the reason of a failure: as Isobar recorded it.
      ...(detail ? { detail: [{ type: 'isobar-detail', valueString: detail }] } : {}),
    });
  }
  return entities;
}

/** Maps one audit row to a FHIR R4 AuditEvent resource. */
export function toFhirAuditEvent(r: AuditRecord, ctx: AuditEventContext = { patientIdSystem: AUDIT_IDENTIFIER_SYSTEMS.record('patient-mrn') }): AuditEvent {
  const system = r.actorRole === 'system';
  const entity = entitiesOf(r, ctx);
  return {
    resourceType: 'AuditEvent',
    id: r.id,
    type: eventTypeOf(r),
    subtype: subtypeOf(r),
    action: actionCodeOf(r.action),
    recorded: r.recordedAt.toISOString(),
    outcome: outcomeCodeOf(r),
    outcomeDesc: `${r.actionLabel ?? r.action}: ${r.outcome}`,
    agent: [
      {
        // The person who asked; a task Isobar ran by itself has no requestor.
        requestor: !system,
        ...(r.actorRole ? { role: [{ text: r.actorRole }] } : {}),
        who: {
          display: r.actorName ?? (r.action === 'sign-in-failed' ? 'unknown user (sign-in failed)' : 'unknown user'),
          ...(r.actorUserId ? { identifier: { system: AUDIT_IDENTIFIER_SYSTEMS.user, value: r.actorUserId } } : {}),
        },
        ...(r.clientAddress ? { network: { address: r.clientAddress, type: '2' as const } } : {}),
      },
    ],
    source: {
      observer: { display: ctx.observer ?? 'Isobar' },
      type: [{ system: AUDIT_SYSTEMS.securitySourceType, code: '4', display: 'Application Server' }],
    },
    ...(entity.length ? { entity } : {}),
  };
}

/** One Bundle entry: a stable `urn:uuid:` per audit row, search mode `match`. */
export function auditBundleEntry(event: AuditEvent): BundleEntry<AuditEvent> {
  return { fullUrl: urnUuid(`audit-event/${event.id}`), resource: event, search: { mode: 'match' } };
}

/**
 * A searchset Bundle written piece by piece, so an export of any size streams: `open()`, then
 * `entry(event)` for each event, then `close(nextUrl)`. The concatenated pieces are one JSON
 * document (no empty `entry` array: FHIR JSON allows none). `next` is the FHIR paging link
 * when the export stopped at its limit.
 */
export function auditBundleWriter(meta: { id: string; timestamp: Date; selfUrl: string }) {
  let entries = 0;
  return {
    open(): string {
      const head: Partial<Bundle> = { resourceType: 'Bundle', id: meta.id, type: 'searchset', timestamp: meta.timestamp.toISOString() };
      return JSON.stringify(head).slice(0, -1);
    },
    entry(event: AuditEvent): string {
      return `${entries++ === 0 ? ',"entry":[' : ','}${JSON.stringify(auditBundleEntry(event))}`;
    },
    close(nextUrl: string | null): string {
      const link = [{ relation: 'self', url: meta.selfUrl }, ...(nextUrl ? [{ relation: 'next', url: nextUrl }] : [])];
      return `${entries ? ']' : ''},"link":${JSON.stringify(link)}}`;
    },
    get count() {
      return entries;
    },
  };
}
