import type { AuditEntry } from '../audit/audit';

/** The coder acting: who decides is stored with the decision, and audited. */
export type CodingActor = Pick<AuditEntry, 'actorRole' | 'clientAddress'> & { actorUserId: string; actorName: string };
