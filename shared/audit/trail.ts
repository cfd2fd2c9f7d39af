import { z } from 'zod';

/** The acts the audit trail records (kebab-case codes), with the words the trail shows. */
export const auditActions = ['sign-in', 'sign-in-failed', 'sign-out', 'access-denied', 'read', 'search', 'create', 'update', 'delete', 'export'] as const;
export type AuditActionCode = (typeof auditActions)[number];

export const auditActionLabel: Record<AuditActionCode, string> = {
  'sign-in': 'Signed in',
  'sign-in-failed': 'Sign-in failed',
  'sign-out': 'Signed out',
  'access-denied': 'Refused access',
  read: 'Opened',
  search: 'Listed or searched',
  create: 'Created',
  update: 'Changed',
  delete: 'Removed',
  export: 'Exported',
};

/** Filters of the audit trail; `before` is the keyset cursor (the last id of the page before). */
export const auditTrailQuerySchema = z.object({
  user: z.string().trim().max(100).optional(),
  patient: z.string().trim().max(100).optional(),
  action: z.enum(auditActions).optional(),
  from: z.iso.date().optional(),
  to: z.iso.date().optional(),
  before: z.string().regex(/^\d{1,18}$/).optional(),
  limit: z.coerce.number().int().min(1).max(200).default(50),
});
export type AuditTrailQuery = z.infer<typeof auditTrailQuerySchema>;

/** One event as the trail shows it: who, what, on what (in words), when, from where. */
export interface AuditTrailItem {
  id: string;
  recordedAt: string;
  actor: string | null;
  actorRole: string | null;
  action: AuditActionCode;
  actionLabel: string;
  outcome: 'success' | 'failure' | 'denied';
  /** "Aster, Ada · MRN 100234 · ACC-2026-0042" for a study; the user's name for a user. */
  target: string | null;
  studyId: string | null;
  clientAddress: string | null;
}

export interface AuditTrailPage {
  items: AuditTrailItem[];
  nextCursor: string | null;
}
