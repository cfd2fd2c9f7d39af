// SQL for the lab's calendar days: shared by every query that counts days in the lab's time zone.

/**
 * The first instant of a local date (SQL of type date) in a time zone (SQL naming an IANA zone; by
 * default the statement's parameter $3): its local midnight. The one rule for where a lab's day starts.
 * `timestamp AT TIME ZONE` alone takes the later of two instants when midnight happens twice (a zone
 * that falls back at midnight, such as one that goes from 01:00 summer time back to 00:00), which would
 * leave that date's first hour in the day before; so the midnight is read with the offset in force
 * just before that instant, which gives the first one. Where midnight does not happen (the clock
 * jumps over it) both give the instant of the jump, the first of that date.
 */
export const localMidnight = (date: string, zone = '$3'): string => {
  const tz = `(${zone})::text`;
  const later = `((${date})::timestamp AT TIME ZONE ${tz})`;
  const before = `(${later} - interval '1 microsecond')`;
  return `(((${date})::timestamp - ((${before} AT TIME ZONE ${tz}) - (${before} AT TIME ZONE 'UTC'))) AT TIME ZONE 'UTC')`;
};
