import { z } from 'zod';

/** The range the chief's turnaround figures cover: the query's schema, kept apart from the figures' data. */

/** The longest range one request may cover. */
export const maxRangeDays = 5 * 366;

const day = (error: string) => z.iso.date({ error });
const daysBetween = (a: string, b: string) => (Date.parse(`${b}T00:00:00Z`) - Date.parse(`${a}T00:00:00Z`)) / 86_400_000;

/** A range of days in the lab's time zone, both ends included. */
export const turnaroundQuerySchema = z
  .object({
    from: day('from must be a date (YYYY-MM-DD).'),
    to: day('to must be a date (YYYY-MM-DD).'),
  })
  .refine((q) => q.from <= q.to, { path: ['to'], error: 'to must be on or after from.' })
  .refine((q) => daysBetween(q.from, q.to) < maxRangeDays, { path: ['to'], error: 'The range may cover at most five years.' });
export type TurnaroundQuery = z.infer<typeof turnaroundQuerySchema>;
