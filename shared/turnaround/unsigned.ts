import type { WorklistItem } from '../study/worklist';
import type { StartBasis } from './figures';

/**
 * An unsigned study on the chief's list (drafts included: the clock runs from the procedure, not
 * from hand-off). Its clock is the turnaround clock: procedure end, else start, else when the record
 * was opened — the same one the physician's "awaiting signature" lists wait by.
 */
export interface UnsignedStudy extends WorklistItem {
  startedAt: string;
  startBasis: StartBasis;
  /** Who owns the signature: the study's operator. */
  ownerId: string | null;
  ownerName: string | null;
  hoursWaiting: number;
  overdue: boolean;
}

export interface UnsignedList {
  targetHours: number;
  /** Every unsigned study, and how many of them are past the target. */
  total: number;
  overdueTotal: number;
  /** The longest-waiting first, at most the list's limit. */
  items: UnsignedStudy[];
}
