// SQL for the lab's calendar days: shared by every query that counts days in the lab's time zone.

/**
 * The first instant of a local date (SQL of type date) in the time zone $3: its local midnight.
 * `timestamp AT TIME ZONE` alone takes the later of two instants when midnight happens twice (a zone
 * that falls back at midnight, such as one that goes from 01:00 summer time back to 00:00), which would
 * leave that date's first hour in the day before; so the midnight is read with the offset in force
 * just before that instant, which gives the first one. Where midnight does not happen (the clock
 * jumps over it) both give the instant of the jump, the first of that date.
 */
export const localMidnight = (date: string): string => {
  const later = `((${date})::timestamp AT TIME ZONE $3::text)`;
  const before = `(${later} - interval '1 microsecond')`;
  return `(((${date})::timestamp - ((${before} AT TIME ZONE $3::text) - (${before} AT TIME ZONE 'UTC'))) AT TIME ZONE 'UTC')`;
};
