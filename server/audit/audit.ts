import type { Request } from 'express';
import type { DataSource, EntityManager } from 'typeorm';

import type { AuditActionCode, AuditOutcomeCode } from '../../shared/audit/trail';

export type AuditOutcome = AuditOutcomeCode;

/** What happened; kebab-case verbs naming the act, not the route (the list is `auditActions` in shared/audit/trail.ts). */
export type AuditAction = AuditActionCode;

export interface AuditEntry {
  actorUserId?: string | null;
  actorName?: string | null;
  actorRole?: string | null;
  action: AuditAction;
  entityType?: string | null;
  entityId?: string | null;
  clientAddress?: string | null;
  outcome: AuditOutcome;
  detail?: Record<string, unknown> | null;
}

export interface AuditRow {
  id: string;
  recorded_at: Date;
  actor_user_id: string | null;
  actor_name: string | null;
  actor_role: string | null;
  action: AuditAction;
  entity_type: string | null;
  entity_id: string | null;
  client_address: string | null;
  outcome: AuditOutcome;
  detail: Record<string, unknown> | null;
}

/** The columns an event is written with, in the order of `auditParameters`. */
export const auditColumns = 'actor_user_id, actor_name, actor_role, action, entity_type, entity_id, client_address, outcome, detail';

/** The values of `auditColumns` for one event (parameters of a statement). */
export function auditParameters(entry: AuditEntry): unknown[] {
  return [
    entry.actorUserId ?? null,
    entry.actorName ?? null,
    entry.actorRole ?? null,
    entry.action,
    entry.entityType ?? null,
    entry.entityId ?? null,
    entry.clientAddress ?? null,
    entry.outcome,
    entry.detail ? JSON.stringify(entry.detail) : null,
  ];
}

/** Appends one event. Pass the transaction's manager when the event belongs to a change. */
export async function recordAudit(db: DataSource | EntityManager, entry: AuditEntry): Promise<void> {
  await db.query(`INSERT INTO audit_event (${auditColumns}) VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9)`, auditParameters(entry));
}

/**
 * Appends a read of a study unless the same user, from the same address, already has the same read
 * (same action, outcome and `detail.view`) of that study recorded within the last `withinSeconds`:
 * a view refreshed over and over (the live report preview after each autosave) is recorded once per
 * window, and the trail still shows who saw which study, when first and from where. Two refreshes
 * arriving at the same instant may both be recorded: a read is never lost, at most repeated.
 * Returns whether a row was written.
 */
export async function recordStudyReadOnce(db: DataSource | EntityManager, entry: AuditEntry & { entityId: string; detail: { view: string } }, withinSeconds: number): Promise<boolean> {
  const params = auditParameters({ ...entry, entityType: 'study' });
  if (withinSeconds <= 0) {
    await recordAudit(db, { ...entry, entityType: 'study' });
    return true;
  }
  const rows: unknown[] = await db.query(
    `INSERT INTO audit_event (${auditColumns})
     SELECT $1::uuid, $2::text, $3::text, $4::text, $5::text, $6::text, $7::text, $8::text, $9::jsonb
     WHERE NOT EXISTS (
       SELECT 1 FROM audit_event e
       WHERE e.study_id = $6::text::uuid AND e.recorded_at > now() - make_interval(secs => $10::float8)
         AND e.actor_user_id IS NOT DISTINCT FROM $1::uuid AND e.client_address IS NOT DISTINCT FROM $7::text
         AND e.action = $4::text AND e.outcome = $8::text AND e.entity_type = 'study' AND e.detail->>'view' = $11::text)
     RETURNING 1 AS written`,
    [...params, withinSeconds, entry.detail.view],
  );
  return rows.length > 0;
}

/** The actor and address of the current request, for an audit entry. */
/** Who did something, as every audit row records it. */
export type AuditActor = Pick<AuditEntry, 'actorUserId' | 'actorName' | 'actorRole' | 'clientAddress'>;

export function auditContext(req: Request): AuditActor {
  const auth = req.session?.auth;
  return {
    actorUserId: auth?.userId ?? null,
    actorName: auth?.displayName ?? null,
    actorRole: auth?.role ?? null,
    clientAddress: req.ip ?? null,
  };
}
