import type { Option } from './fields';

/** Pick-list options from a code → label table, in the table's order. */
export function optionsOf<T extends string>(labels: Record<T, string>): Option<T>[] {
  return (Object.entries(labels) as [T, string][]).map(([value, label]) => ({ value, label }));
}
