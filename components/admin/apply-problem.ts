import { ApiError } from '../data/api';

/**
 * Places a problem's field errors on the form's fields: a JSON pointer `/values/cfr` under `prefix`
 * `/values` becomes the field `values.cfr`. Returns the errors that match no field, for a summary.
 */
export function applyFieldErrors(error: unknown, prefix: string, fields: readonly string[], setError: (name: string, e: { type: string; message: string }) => void, formPrefix = ''): string[] {
  if (!(error instanceof ApiError)) return [error instanceof Error ? error.message : String(error)];
  const rest: string[] = [];
  for (const e of error.problem.errors ?? []) {
    const key = e.pointer.startsWith(`${prefix}/`) ? e.pointer.slice(prefix.length + 1) : null;
    if (key && fields.includes(key)) setError(`${formPrefix}${key}`, { type: 'server', message: e.detail });
    else rest.push(e.detail);
  }
  if (!error.problem.errors?.length) rest.push(error.message);
  return rest;
}
