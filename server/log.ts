import { randomUUID } from 'node:crypto';
import type { IncomingMessage, ServerResponse } from 'node:http';
import pino, { type DestinationStream, type Logger } from 'pino';
import { pinoHttp } from 'pino-http';
import type { Logger as OrmLogger } from 'typeorm';

export type { Logger };

/**
 * Structured logs (one JSON object per line) that never carry patient data:
 * - requests are logged by method, path and status: never the query string (search text), headers,
 *   cookies or bodies;
 * - failing queries by their SQL text (placeholders only) and SQLSTATE: never the parameters, nor
 *   PostgreSQL's message, which may quote a value ("invalid input syntax …: \"Quxworth\"");
 * - messages are fixed strings; request text only ever goes into fields, never into a message.
 */
export const logLevels = ['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent'] as const;
export type LogLevel = (typeof logLevels)[number];

export function createLogger(level: LogLevel = defaultLevel(), destination?: DestinationStream): Logger {
  return pino(
    {
      level,
      base: { service: 'isobar' },
      timestamp: pino.stdTimeFunctions.isoTime,
      serializers: { err: safeError, error: safeError },
      // Belt and braces: these never belong in a log line, whoever passes them.
      redact: { paths: ['req.headers.cookie', 'req.headers.authorization', 'parameters', '*.parameters'], censor: '[removed]' },
    },
    destination,
  );
}

/** The level when nothing else says: quiet under test, info otherwise (LOG_LEVEL overrides). */
export function defaultLevel(env: Record<string, string | undefined> = process.env): LogLevel {
  const wanted = env.LOG_LEVEL as LogLevel | undefined;
  if (wanted && (logLevels as readonly string[]).includes(wanted)) return wanted;
  return env.NODE_ENV === 'test' ? 'silent' : 'info';
}

let fallback: Logger | undefined;
/** The process-wide logger for code that was given none. */
export function defaultLogger(): Logger {
  fallback ??= createLogger();
  return fallback;
}

/** A request id: the caller's when it is a short token (a proxy's), else a new one. */
const requestIdPattern = /^[A-Za-z0-9._-]{1,64}$/;

/** pino-http: one line per request with an id (echoed as X-Request-Id), method, path and status. */
export function requestLogger(logger: Logger) {
  return pinoHttp({
    logger,
    genReqId: (req: IncomingMessage, res: ServerResponse) => {
      const given = req.headers['x-request-id'];
      const id = typeof given === 'string' && requestIdPattern.test(given) ? given : randomUUID();
      res.setHeader('X-Request-Id', id);
      return id;
    },
    serializers: {
      req: (req: { id?: unknown; method?: string; url?: string }) => ({ id: req.id, method: req.method, path: (req.url ?? '').split('?')[0] }),
      res: (res: { statusCode?: number }) => ({ statusCode: res.statusCode }),
      err: safeError,
    },
    wrapSerializers: false,
    customLogLevel: (_req, res, error) => (error || res.statusCode >= 500 ? 'error' : res.statusCode >= 400 ? 'info' : 'info'),
    customSuccessMessage: () => 'request finished',
    customErrorMessage: () => 'request failed',
  });
}

/** Fields of a PostgreSQL error that name the schema, never a value. */
const databaseFields = ['code', 'severity', 'routine', 'table', 'column', 'constraint', 'schema', 'dataType'] as const;

/**
 * An error as a log may hold it. A database error keeps only its SQLSTATE and the names of what it
 * concerns (its message and detail can quote values; TypeORM adds the parameters). Anything else keeps
 * its type, message and stack.
 */
export function safeError(error: unknown): Record<string, unknown> {
  if (!error || typeof error !== 'object') return { type: typeof error, value: typeof error === 'string' ? '[text]' : String(error) };
  const e = error as Record<string, unknown> & { name?: string; message?: string; stack?: string; driverError?: unknown };
  const db = (e.driverError && typeof e.driverError === 'object' ? e.driverError : 'severity' in e ? e : null) as Record<string, unknown> | null;
  if (db) {
    const fields: Record<string, unknown> = { type: e.name ?? 'DatabaseError' };
    for (const f of databaseFields) if (db[f] !== undefined) fields[f] = db[f];
    if (typeof e.query === 'string') fields.query = e.query;
    return fields;
  }
  return { type: e.name ?? 'Error', message: e.message, code: e.code, stack: e.stack };
}

/** TypeORM's logger: failing and slow queries by their SQL text, never their parameters. */
export class SafeQueryLogger implements OrmLogger {
  constructor(private readonly logger: Logger) {}
  logQuery(): void {}
  logQueryError(error: string | Error, query: string): void {
    this.logger.error({ err: typeof error === 'string' ? { type: 'DatabaseError' } : safeError(error), query }, 'database query failed');
  }
  logQuerySlow(time: number, query: string): void {
    this.logger.warn({ durationMs: time, query }, 'slow database query');
  }
  logSchemaBuild(): void {}
  logMigration(message: string): void {
    this.logger.info({ migration: message }, 'migration');
  }
  log(level: 'log' | 'info' | 'warn', message: unknown): void {
    // TypeORM's own messages (pool errors and the like): as data, never as a format string.
    this.logger[level === 'warn' ? 'warn' : 'info']({ detail: message instanceof Error ? safeError(message) : String(message).slice(0, 200) }, 'database');
  }
}
