import type { WorklistItem } from './worklist';

/**
 * Studies awaiting a physician's signature, oldest first: those the signed-in physician operated,
 * and all of them. A study waits from the end of its procedure (the turnaround clock), or from when
 * its record was opened while the end is not recorded.
 */
export interface AwaitingStudy extends WorklistItem {
  /** ISO 8601: the turnaround clock's start — procedure end, else start, else when the record was opened. */
  waitingSince: string;
  hoursWaiting: number;
  /** Past the lab's signature target. */
  overdue: boolean;
}

export interface AwaitingList {
  items: AwaitingStudy[];
  /** How many there are in all (the list shows at most `limit`). */
  total: number;
}

export interface AwaitingSignature {
  targetHours: number;
  limit: number;
  mine: AwaitingList;
  all: AwaitingList;
}

/** A waiting time in words a list can show: "45 min", "5 h", "2 d 3 h", "12 d". */
export function ageLabel(hours: number): string {
  if (!Number.isFinite(hours) || hours < 0) return '—';
  const minutes = Math.floor(hours * 60);
  if (minutes < 60) return `${minutes} min`;
  const h = Math.floor(hours);
  if (h < 24) return `${h} h`;
  const days = Math.floor(h / 24);
  const rest = h % 24;
  return days >= 7 || rest === 0 ? `${days} d` : `${days} d ${rest} h`;
}
