import type { Problem } from '../../shared/http/problem';

/** A problem+json answer from the server, kept whole so forms can place field errors. */
export type ApiProblem = Problem;

export class ApiError extends Error {
  constructor(public readonly problem: ApiProblem) {
    super(problem.detail ?? problem.title);
    this.name = 'ApiError';
  }
  get status(): number {
    return this.problem.status;
  }
}

/** A request that has had no answer for this long counts as unreachable (a pulled cable never fails fast). */
const requestTimeoutMs = 15_000;

/**
 * The answer to a read the page's early script (components/data/early-reads.js) started before the
 * app ran, handed out once: the first plain GET of that path adopts it instead of asking again.
 */
export function takeEarlyRead(path: string): Promise<Response> | undefined {
  const reads = typeof window !== 'undefined' ? (window as { __isobarEarlyReads?: Record<string, Promise<Response> | undefined> }).__isobarEarlyReads : undefined;
  const read = reads?.[path];
  if (read) delete reads[path];
  return read;
}

/** Fetches JSON from the Isobar API on the same origin; non-2xx answers become an ApiError. */
export async function apiFetch<T>(path: string, init: RequestInit = {}): Promise<T> {
  let response: Response;
  const abort = new AbortController();
  const timer = setTimeout(() => abort.abort(), requestTimeoutMs);
  const early = !init.method && !init.body && !init.signal ? takeEarlyRead(path) : undefined;
  try {
    response = early
      ? await Promise.race([early, new Promise<never>((_, reject) => abort.signal.addEventListener('abort', () => reject(new Error('timed out'))))])
      : await fetch(`/api${path}`, {
          credentials: 'same-origin',
          signal: abort.signal,
          ...init,
          headers: { Accept: 'application/json', ...(init.body ? { 'Content-Type': 'application/json' } : {}), ...init.headers },
        });
  } catch {
    throw new ApiError({ type: 'about:blank', title: 'Network unavailable', status: 0, detail: 'The server could not be reached. Check the connection.' });
  } finally {
    clearTimeout(timer);
  }
  const text = await response.text();
  const body = text ? safeJson(text) : undefined;
  if (!response.ok) {
    const problem = (body && typeof body === 'object' && 'title' in body ? body : undefined) as ApiProblem | undefined;
    throw new ApiError(problem ?? { type: 'about:blank', title: response.statusText || 'Request failed', status: response.status });
  }
  return body as T;
}

/**
 * Whether a failed read is worth asking again: a 4xx answer (signed out, forbidden, missing) will not
 * change by asking again, so it is shown at once; other failures get two more tries.
 */
export function shouldRetryRead(failureCount: number, error: unknown): boolean {
  const status = error instanceof ApiError ? error.status : undefined;
  if (status !== undefined && status >= 400 && status < 500 && status !== 408 && status !== 429) return false;
  return failureCount < 2;
}

function safeJson(text: string): unknown {
  try {
    return JSON.parse(text);
  } catch {
    return undefined;
  }
}
