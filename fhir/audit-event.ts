import type { AuditEvent } from 'fhir/r4';

/** The fields of an audit row this mapping reads (see server/audit/audit.ts). */
export interface AuditRecord {
  id: string;
  recordedAt: Date;
  actorUserId: string | null;
  actorName: string | null;
  actorRole: string | null;
  action: string;
  entityType: string | null;
  entityId: string | null;
  clientAddress: string | null;
  outcome: 'success' | 'failure' | 'denied';
}

const DCM = 'http://dicom.nema.org/resources/ontology/DCM';

/** Event types from DICOM PS3.16 CID 400 (audit event ID), as FHIR R4 AuditEvent.type suggests. */
const eventType: Record<string, { code: string; display: string }> = {
  authentication: { code: '110114', display: 'User Authentication' },
  patientRecord: { code: '110110', display: 'Patient Record' },
  securityAlert: { code: '110113', display: 'Security Alert' },
  export: { code: '110106', display: 'Export' },
};

function typeOf(action: string) {
  if (action === 'sign-in' || action === 'sign-in-failed' || action === 'sign-out') return eventType.authentication;
  if (action === 'access-denied') return eventType.securityAlert;
  if (action === 'export') return eventType.export;
  return eventType.patientRecord;
}

/** AuditEvent.action: C create, R read/view, U update, D delete, E execute. */
function actionCode(action: string): AuditEvent['action'] {
  switch (action) {
    case 'create':
      return 'C';
    case 'read':
    case 'search':
    case 'export':
      return 'R';
    case 'update':
      return 'U';
    case 'delete':
      return 'D';
    default:
      return 'E';
  }
}

/** AuditEvent.outcome: 0 success, 4 minor failure (refused or failed attempt). */
function outcomeCode(outcome: AuditRecord['outcome']): AuditEvent['outcome'] {
  return outcome === 'success' ? '0' : '4';
}

/** Maps one audit row to a FHIR R4 AuditEvent resource. */
export function toFhirAuditEvent(row: AuditRecord): AuditEvent {
  const subtype =
    row.action === 'sign-in' || row.action === 'sign-in-failed'
      ? [{ system: DCM, code: '110122', display: 'Login' }]
      : row.action === 'sign-out'
        ? [{ system: DCM, code: '110123', display: 'Logout' }]
        : undefined;
  return {
    resourceType: 'AuditEvent',
    id: row.id,
    type: { system: DCM, ...typeOf(row.action) },
    ...(subtype ? { subtype } : {}),
    action: actionCode(row.action),
    recorded: row.recordedAt.toISOString(),
    outcome: outcomeCode(row.outcome),
    outcomeDesc: `${row.action}: ${row.outcome}`,
    agent: [
      {
        requestor: true,
        ...(row.actorRole ? { role: [{ text: row.actorRole }] } : {}),
        who: {
          display: row.actorName ?? 'unknown user',
          ...(row.actorUserId ? { identifier: { system: 'urn:isobar:user', value: row.actorUserId } } : {}),
        },
        ...(row.clientAddress ? { network: { address: row.clientAddress, type: '2' as const } } : {}),
      },
    ],
    source: {
      observer: { display: 'Isobar' },
      type: [{ system: 'http://terminology.hl7.org/CodeSystem/security-source-type', code: '4', display: 'Application Server' }],
    },
    ...(row.entityType
      ? {
          entity: [
            {
              what: {
                display: row.entityType,
                ...(row.entityId ? { identifier: { system: `urn:isobar:${row.entityType}`, value: row.entityId } } : {}),
              },
              type: { system: 'http://terminology.hl7.org/CodeSystem/audit-entity-type', code: '2', display: 'System Object' },
            },
          ],
        }
      : {}),
  };
}
