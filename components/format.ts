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
