/** Display formatting for the client (dates in the lab's local time). */

// One formatter each, made once: building a formatter per call (what toLocaleString with options
// does) costs more than the formatting, and a list formats several dates per row.
const dateTimeFormat = new Intl.DateTimeFormat('en-GB', { day: '2-digit', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit' });
const dayFormat = new Intl.DateTimeFormat('en-GB', { weekday: 'short', day: 'numeric', month: 'short', year: 'numeric' });

export function formatDateTime(iso: string | null): string {
  if (!iso) return 'not recorded';
  return dateTimeFormat.format(new Date(iso));
}

export function formatHours(hours: number): string {
  if (hours < 1) return `${Math.round(hours * 60)} min`;
  if (hours < 48) return `${hours.toFixed(1)} h`;
  return `${Math.floor(hours / 24)} d ${Math.round(hours % 24)} h`;
}

export function patientName(p: { familyName: string; givenName: string }): string {
  return `${p.familyName.toUpperCase()}, ${p.givenName}`;
}

/** The local day a study belongs to, for day headings: "Today", "Yesterday", else the date. */
export function dayLabel(iso: string | null, now = new Date()): string {
  if (!iso) return 'Time not recorded';
  const d = new Date(iso);
  const start = (x: Date) => new Date(x.getFullYear(), x.getMonth(), x.getDate()).getTime();
  const days = Math.round((start(now) - start(d)) / 86_400_000);
  if (days === 0) return 'Today';
  if (days === 1) return 'Yesterday';
  return dayFormat.format(d);
}
