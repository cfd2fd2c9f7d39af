/** What a number box's text means: empty → null, a number (comma or point decimal) → it, else invalid. */
export function parseNumberText(text: string): { ok: true; value: number | null } | { ok: false } {
  const t = text.trim().replace(',', '.');
  if (t === '') return { ok: true, value: null };
  if (!/^-?(\d+\.?\d*|\.\d+)$/.test(t)) return { ok: false };
  const n = Number(t);
  return Number.isFinite(n) ? { ok: true, value: n } : { ok: false };
}
