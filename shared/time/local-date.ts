/**
 * The calendar date (YYYY-MM-DD) an instant falls on in a time zone. A case that ends at 19:30 in
 * New York on 31 December is a 31 December case, although it is already 1 January in UTC: dates
 * of service, code-set years and day boundaries are the lab's, not the server's.
 */
const formatters = new Map<string, Intl.DateTimeFormat>();

export function localDate(instant: string | Date, timeZone: string): string | null {
  const d = instant instanceof Date ? instant : new Date(instant);
  if (Number.isNaN(d.getTime())) return null;
  let f = formatters.get(timeZone);
  if (!f) {
    f = new Intl.DateTimeFormat('en-US', { timeZone, year: 'numeric', month: '2-digit', day: '2-digit' });
    formatters.set(timeZone, f);
  }
  const parts = Object.fromEntries(f.formatToParts(d).map((p) => [p.type, p.value]));
  return `${parts.year}-${parts.month}-${parts.day}`;
}
