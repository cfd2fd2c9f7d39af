import type { DataSource, EntityManager } from 'typeorm';
import { labSettings } from '../settings/lab-settings';

export interface TurnaroundSettings {
  /** IANA time zone of the lab: weeks and day ranges are counted in it. */
  timeZone: string;
  /** A study unsigned this long after its start is overdue. */
  signatureTargetHours: number;
}

/** The lab's turnaround settings, from the lab settings the admin keeps (one place for both). */
export async function turnaroundSettings(db: DataSource | EntityManager): Promise<TurnaroundSettings> {
  const { timeZone, signatureTargetHours } = await labSettings(db);
  return { timeZone, signatureTargetHours };
}
