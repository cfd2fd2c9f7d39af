import type { ValueTransformer } from 'typeorm';

/** pg returns `numeric` as text (it may not fit a double); measurements here always do, so read numbers. */
export const numeric: ValueTransformer = {
  to: (value: number | null | undefined) => value,
  from: (value: string | null) => (value === null ? null : Number(value)),
};
