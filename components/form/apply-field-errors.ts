import { pathOfPointer } from '../../shared/http/problem';
import { ApiError } from '../data/api';

/**
 * Places a problem's field errors on a form's fields: the JSON pointer `/values/cfr` under `prefix`
 * `/values` names the field `values.cfr` (with `formPrefix` "values."), `/patient/mrn` with no prefix
 * the field `patient.mrn`. Only the named `fields` are placed when given. Returns the messages that
 * match no field (or the error's own message), for a summary above the form.
 */
export function applyFieldErrors(
  error: unknown,
  setError: (name: string, e: { type: string; message: string }) => void,
  options: { prefix?: string; fields?: readonly string[]; formPrefix?: string } = {},
): string[] {
  if (!(error instanceof ApiError)) return [error instanceof Error ? error.message : String(error)];
  const { prefix = '', fields, formPrefix = '' } = options;
  const rest: string[] = [];
  for (const e of error.problem.errors ?? []) {
    const key = e.pointer.startsWith(`${prefix}/`) ? pathOfPointer(e.pointer.slice(prefix.length)).join('.') : null;
    if (key && (!fields || fields.includes(key))) setError(`${formPrefix}${key}`, { type: 'server', message: e.detail });
    else rest.push(e.detail);
  }
  if (!error.problem.errors?.length) rest.push(error.message);
  return rest;
}
