/**
 * Whether an error means the database could not be reached or went away (an outage, a restart, a
 * failover), as opposed to a query it refused. Those are answered 503 with Retry-After: the client
 * may try again, and nothing about the request was wrong.
 */
const networkCodes = new Set(['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', 'ENOTFOUND', 'EHOSTUNREACH', 'ENETUNREACH', 'EAI_AGAIN']);
/** SQLSTATE: 57P01 admin shutdown, 57P02 crash shutdown, 57P03 cannot connect now, 53300 too many connections. */
const unavailableStates = new Set(['57P01', '57P02', '57P03', '53300']);
const unavailableMessages = /Connection terminated|timeout exceeded when trying to connect|Client has encountered a connection error|Connection terminated due to connection timeout|the database system is (starting up|shutting down|in recovery mode)|Client was closed and is not queryable|Cannot use a pool after calling end/i;

export function isDatabaseUnavailable(error: unknown, depth = 0): boolean {
  if (!error || typeof error !== 'object' || depth > 3) return false;
  const e = error as { code?: unknown; message?: unknown; driverError?: unknown; cause?: unknown; errors?: unknown };
  if (typeof e.code === 'string' && (networkCodes.has(e.code) || unavailableStates.has(e.code) || /^08[0-9A-Z]{3}$/.test(e.code))) return true;
  if (typeof e.message === 'string' && unavailableMessages.test(e.message)) return true;
  if (Array.isArray(e.errors) && e.errors.some((x) => isDatabaseUnavailable(x, depth + 1))) return true; // AggregateError
  return isDatabaseUnavailable(e.driverError, depth + 1) || isDatabaseUnavailable(e.cause, depth + 1);
}

/** Seconds a client should wait before trying again during an outage. */
export const retryAfterSeconds = 5;
