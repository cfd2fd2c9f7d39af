/** Display formatting for the client (dates in the lab's local time). */
export function formatDateTime(iso: string | null): string {
  if (!iso) return 'not recorded';
  const d = new Date(iso);
  return d.toLocaleString('en-GB', { day: '2-digit', month: 'short', year: 'numeric', hour: '2-digit', minute: '2-digit' });
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
  return d.toLocaleDateString('en-GB', { weekday: 'short', day: 'numeric', month: 'short', year: 'numeric' });
}
