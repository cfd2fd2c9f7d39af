import type { DataSource } from 'typeorm';
import { recordAudit, type AuditActor } from '../audit/audit';

/**
 * The audit rows of signing in and out. The routes run the provider's flow and the session; these
 * record its outcome, each in one row.
 */

/** A completed sign-in (or a renewed confirmation of who signs, `reauthentication`), by the user now signed in. */
export async function recordSignIn(dataSource: DataSource, actor: AuditActor, userId: string, { reauthentication = false } = {}): Promise<void> {
  await recordAudit(dataSource, {
    ...actor,
    action: 'sign-in',
    entityType: 'user',
    entityId: userId,
    outcome: 'success',
    ...(reauthentication ? { detail: { reauthentication: true } } : {}),
  });
}

/** A sign-in that did not complete: `reason` is a fixed code, never the provider's or the address bar's text. */
export async function recordFailedSignIn(dataSource: DataSource, actor: AuditActor, reason: string): Promise<void> {
  await recordAudit(dataSource, { ...actor, action: 'sign-in-failed', outcome: 'failure', detail: { reason } });
}

export async function recordSignOut(dataSource: DataSource, actor: AuditActor, userId: string): Promise<void> {
  await recordAudit(dataSource, { ...actor, action: 'sign-out', entityType: 'user', entityId: userId, outcome: 'success' });
}
