import { z } from 'zod';

/** The acts the audit trail records (kebab-case codes), with the words the trail shows. */
export const auditActions = [
  'sign-in',
  'sign-in-failed',
  'sign-out',
  'access-denied',
  'read',
  'search',
  'create',
  'update',
  'delete',
  'export',
  'mark-ready',
  'send-back',
  'sign',
  'open-addendum',
  'sign-addendum',
  'discard-addendum',
  'verify',
] as const;
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
  'mark-ready': 'Marked ready to sign',
  'send-back': 'Sent back',
  sign: 'Signed report',
  'open-addendum': 'Opened addendum',
  'sign-addendum': 'Signed addendum',
  'discard-addendum': 'Discarded addendum',
  verify: 'Verified a report',
};

export const auditOutcomes = ['success', 'failure', 'denied'] as const;
export type AuditOutcomeCode = (typeof auditOutcomes)[number];

const day = /^\d{4}-\d{2}-\d{2}$/;
/** A day (YYYY-MM-DD, the database's time zone) or an instant with its offset (ISO 8601). */
const dayOrInstant = (name: string) =>
  z.union([z.iso.date(), z.iso.datetime({ offset: true })], { error: `${name} must be a date (YYYY-MM-DD) or a date and time with its offset (ISO 8601).` });

/**
 * What the audit trail can be searched by. Each filter narrows (AND):
 * - `user`: part of a person's name or e-mail, or their user id;
 * - `patient`: an MRN (any case) or the start of a family name: events on that patient's studies;
 * - `study`: an accession number (any case) or a study id;
 * - `action`, `outcome`: codes as above;
 * - `from` (inclusive) and `to`: a day (the whole day, `to` included) or an instant (`to` excluded).
 */
const text = (name: string) =>
  z
    .string()
    .trim()
    .max(100, { error: `${name} is too long (100 characters at most).` })
    .optional()
    .transform((v) => v || undefined);
/** A filter left empty in a form (`?action=`) is no filter. */
const blankIsAbsent = <T extends z.ZodType>(schema: T) => z.preprocess((v) => (v === '' ? undefined : v), schema);
const filterFields = z.object({
  user: text('user'),
  patient: text('patient'),
  study: text('study'),
  action: blankIsAbsent(z.enum(auditActions, { error: 'action is not an action the audit trail records.' }).optional()),
  outcome: blankIsAbsent(z.enum(auditOutcomes, { error: 'outcome must be success, failure or denied.' }).optional()),
  from: blankIsAbsent(dayOrInstant('from').optional()),
  to: blankIsAbsent(dayOrInstant('to').optional()),
});
const orderedRange = (f: { from?: string; to?: string }) => !f.from || !f.to || rangeStart(f.from) <= rangeStart(f.to);
const rangeError = { error: 'from must not be after to.', path: ['to'] };

const auditFiltersSchema = filterFields.refine(orderedRange, rangeError);
export type AuditFilters = z.infer<typeof auditFiltersSchema>;

/** Compares a day and an instant by where each starts (a day as UTC midnight; close enough to order a range). */
function rangeStart(value: string): number {
  return Date.parse(day.test(value) ? `${value}T00:00:00Z` : value);
}

/** GET /api/audit-trail: the filters, an opaque keyset cursor (`nextCursor` of the page before) and a page size. */
export const auditTrailQuerySchema = filterFields
  .extend({
    cursor: z.string().max(200, { error: 'The page cursor is not valid.' }).optional(),
    limit: z.coerce.number().int({ error: 'limit must be a whole number.' }).min(1, { error: 'limit must be at least 1.' }).max(200, { error: 'limit must be at most 200.' }).default(50),
  })
  .refine(orderedRange, rangeError);

const auditExportFormats = ['csv', 'fhir'] as const;
export type AuditExportFormat = (typeof auditExportFormats)[number];

/** GET /api/audit-trail/export: the filters and the format (CSV, or FHIR R4 AuditEvent resources in a Bundle). */
export const auditExportQuerySchema = filterFields
  .extend({
    format: z.enum(auditExportFormats, { error: 'format must be csv or fhir.' }).default('csv'),
    /** FHIR: events per Bundle (FHIR search's `_count`); the Bundle's `next` link continues. */
    _count: z.coerce.number().int({ error: '_count must be a whole number.' }).min(1, { error: '_count must be at least 1.' }).max(10_000, { error: '_count must be at most 10000.' }).optional(),
    cursor: z.string().max(200, { error: 'The page cursor is not valid.' }).optional(),
  })
  .refine(orderedRange, rangeError);

/** The filters as the audit trail records them when it is viewed or exported (only those given). */
export function filtersUsed(q: AuditFilters): Partial<AuditFilters> {
  const used: Record<string, string> = {};
  for (const key of ['user', 'patient', 'study', 'action', 'outcome', 'from', 'to'] as const) if (q[key]) used[key] = q[key]!;
  return used;
}

/** One event as the trail shows it: who, what, on what (in words), when, from where. */
export interface AuditTrailItem {
  id: string;
  recordedAt: string;
  actor: string | null;
  actorRole: string | null;
  action: string;
  actionLabel: string;
  outcome: AuditOutcomeCode;
  entityType: string | null;
  entityId: string | null;
  /** "Aster, Ada · MRN 100234 · ACC-2026-0042" for a study; the user's name for a user. */
  target: string | null;
  studyId: string | null;
  clientAddress: string | null;
}

export interface AuditTrailPage {
  items: AuditTrailItem[];
  nextCursor: string | null;
}

/** Words for an action code; a code this list does not know yet shows as itself. */
export function labelOfAction(action: string): string {
  return (auditActionLabel as Record<string, string>)[action] ?? action;
}
