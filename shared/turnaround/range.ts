/** Preset ranges of the turnaround page, counted back from today (both ends included). */
export const rangePresets = ['4w', '3m', '12m', 'year'] as const;
export type RangePreset = (typeof rangePresets)[number];

export const rangePresetLabel: Readonly<Record<RangePreset, string>> = Object.freeze({
  '4w': 'Last 4 weeks',
  '3m': 'Last 3 months',
  '12m': 'Last 12 months',
  year: 'This year',
});

const pad = (n: number) => String(n).padStart(2, '0');
/** A calendar day as YYYY-MM-DD (the day's own fields, no time zone conversion). */
export const isoDay = (d: Date) => `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}`;

export function presetRange(preset: RangePreset, today: Date): { from: string; to: string } {
  const to = isoDay(today);
  const start = new Date(today.getFullYear(), today.getMonth(), today.getDate());
  if (preset === '4w') start.setDate(start.getDate() - 27);
  else if (preset === '3m') start.setMonth(start.getMonth() - 3, start.getDate() + 1);
  else if (preset === '12m') start.setFullYear(start.getFullYear() - 1, start.getMonth(), start.getDate() + 1);
  else start.setMonth(0, 1);
  return { from: isoDay(start), to };
}
