import { z } from 'zod';
import { studyStates } from './vocabulary';

/** The worklist's page size unless a request asks for another. */
export const WORKLIST_PAGE_SIZE = 25;

/** GET /api/studies query: filters and a keyset cursor (opaque to the client). */
export const worklistQuerySchema = z.object({
  state: z.enum(studyStates, { error: 'state must be one of draft, awaiting-signature, signed, amended.' }).optional(),
  q: z.string().trim().min(1).max(100, { error: 'Search text is too long.' }).optional(),
  operatorId: z.uuid({ error: 'operatorId must be a user id.' }).optional(),
  /** Instants, so "today" is the lab's day, not the server's: from inclusive, to exclusive. */
  from: z.iso.datetime({ offset: true, error: 'from must be a date and time with its offset (ISO 8601).' }).optional(),
  to: z.iso.datetime({ offset: true, error: 'to must be a date and time with its offset (ISO 8601).' }).optional(),
  cursor: z.string().max(200).optional(),
  limit: z.coerce.number().int().min(1).max(100, { error: 'limit must be at most 100.' }).default(WORKLIST_PAGE_SIZE),
});
export type WorklistQuery = z.infer<typeof worklistQuerySchema>;

export interface WorklistItem {
  id: string;
  accession: string;
  state: (typeof studyStates)[number];
  procedureStartedAt: string | null;
  procedureEndedAt: string | null;
  /** The worklist's order: procedure start, or when the record was opened if not yet known. */
  sortAt: string;
  indication: string | null;
  operatorName: string | null;
  version: number;
  patient: { mrn: string; familyName: string; givenName: string; birthDate: string; sex: string };
}

export interface WorklistPage {
  items: WorklistItem[];
  nextCursor: string | null;
}
