import type { DataSource, EntityManager } from 'typeorm';
import { defaultSignatureTargetHours } from '../../shared/turnaround/overdue';

export interface TurnaroundSettings {
  /** IANA time zone of the lab: weeks and day ranges are counted in it. */
  timeZone: string;
  /** A study unsigned this long after its start is overdue. */
  signatureTargetHours: number;
}

/** Whether the runtime (and so PostgreSQL's tz database, which has the same names) knows the zone. */
export function isTimeZone(name: string): boolean {
  try {
    new Intl.DateTimeFormat('en', { timeZone: name });
    return true;
  } catch {
    return false;
  }
}

/**
 * The lab's turnaround settings. Until the lab settings are stored in the database these are the
 * defaults: UTC (or `LAB_TIME_ZONE` when it names a zone) and the common-practice 24 h target.
 */
export async function turnaroundSettings(_db: DataSource | EntityManager): Promise<TurnaroundSettings> {
  const zone = process.env.LAB_TIME_ZONE?.trim();
  return {
    timeZone: zone && isTimeZone(zone) ? zone : 'UTC',
    signatureTargetHours: defaultSignatureTargetHours,
  };
}
