/**
 * Problem details (RFC 9457) as the server answers them and the client reads them, and the JSON
 * pointers (RFC 6901) that place a field's problem in the request body.
 */

/** The last part of every problem type the server answers with (`…/problems/<slug>`). */
export const problemSlugs = [
  'bad-request', 'bad-upload', 'cross-site-request', 'delivery-in-progress', 'duplicate-row-id', 'file-too-large', 'forbidden', 'internal', 'no-file',
  'not-current-set', 'not-found', 'patient-mismatch', 'patient-shared', 'payload-too-large', 'reason-required',
  'reauthentication-required', 'review-completed', 'review-incomplete', 'service-unavailable', 'stale-settings', 'stale-version',
  'study-incomplete', 'study-signed', 'suggestions-superseded', 'too-many-sign-in-attempts', 'unauthorized', 'unprocessable',
  'unsupported-encoding', 'unsupported-file-type', 'uploads-busy', 'wrong-state',
] as const;
export type ProblemSlug = (typeof problemSlugs)[number];

/** The slug of a problem's type, when it is one of ours. */
export function problemSlugOf(type: string | undefined): ProblemSlug | undefined {
  const slug = type?.split('/').pop();
  return (problemSlugs as readonly string[]).includes(slug ?? '') ? (slug as ProblemSlug) : undefined;
}

/** One field-level problem, located by a JSON pointer into the request body. */
export interface FieldProblem {
  pointer: string;
  detail: string;
}

/** RFC 9457 problem details, with the field problems of a refused body. */
export interface Problem {
  type: string;
  title: string;
  status: number;
  detail?: string;
  instance?: string;
  errors?: FieldProblem[];
}

/** The JSON pointer of a path of keys and row indexes (`['vessels', 0, 'restPa']` → `/vessels/0/restPa`). */
export function pointerOf(path: readonly PropertyKey[]): string {
  return path.map((p) => '/' + String(p).replaceAll('~', '~0').replaceAll('/', '~1')).join('');
}

/** The path a JSON pointer names; an all-digit step is a row index. */
export function pathOfPointer(pointer: string): (string | number)[] {
  return pointer
    .split('/')
    .slice(1)
    .map((p) => p.replaceAll('~1', '/').replaceAll('~0', '~'))
    .map((p) => (/^\d+$/.test(p) ? Number(p) : p));
}
