import type { ErrorRequestHandler, RequestHandler } from 'express';
import { isDatabaseUnavailable, retryAfterSeconds } from '../db/availability';
import { httpErrorOf } from './domain-errors';

import { pointerOf, type FieldProblem, type Problem, type ProblemSlug } from '../../shared/http/problem';

export { pointerOf, type FieldProblem, type Problem };

const PROBLEM_BASE = 'https://isobar.example/problems/';

/** An error that knows its HTTP status and how to describe itself to the client. */
export class HttpError extends Error {
  constructor(
    public readonly status: number,
    public readonly slug: ProblemSlug,
    public readonly title: string,
    detail?: string,
    public readonly errors?: FieldProblem[],
    /** Extra members of the problem document (RFC 9457 extensions), e.g. the current record on a conflict. */
    public readonly extensions?: Record<string, unknown>,
  ) {
    super(detail ?? title);
    this.name = 'HttpError';
  }
}

export class BadRequestError extends HttpError {
  constructor(detail: string, errors?: FieldProblem[]) {
    super(400, 'bad-request', 'The request could not be understood', detail, errors);
  }
}
export class NotFoundError extends HttpError {
  constructor(detail = 'Nothing exists at this address.') {
    super(404, 'not-found', 'Not found', detail);
  }
}
export class ServiceUnavailableError extends HttpError {
  constructor(detail: string, extensions: Record<string, unknown> = {}) {
    super(503, 'service-unavailable', 'Service unavailable', detail, undefined, extensions);
  }
}

/** The problem document of an error: its extensions first, so none can replace a member RFC 9457 defines. */
export function toProblem(error: HttpError, instance?: string): Problem {
  return {
    ...(error.extensions ?? {}),
    type: PROBLEM_BASE + error.slug,
    title: error.title,
    status: error.status,
    detail: error.message,
    ...(instance ? { instance } : {}),
    ...(error.errors?.length ? { errors: error.errors } : {}),
  };
}

export class UnprocessableError extends HttpError {
  constructor(detail: string, errors?: FieldProblem[]) {
    super(422, 'unprocessable', 'A field cannot be accepted', detail, errors);
  }
}

type ErrorLike = { type?: string; status?: number; statusCode?: number; expose?: boolean; code?: string; name?: string; issues?: unknown; message?: string };

/** A zod error (classic or core) thrown anywhere: the input broke a schema, not the server. */
function fromZod(err: ErrorLike): HttpError | undefined {
  if (err.name !== 'ZodError' || !Array.isArray(err.issues)) return undefined;
  const errors = (err.issues as Array<{ path?: PropertyKey[]; message?: string }>).map((i) => ({ pointer: pointerOf(i.path ?? []), detail: i.message ?? 'Not a valid value.' }));
  return new UnprocessableError(`The request has ${errors.length === 1 ? 'a field' : `${errors.length} fields`} to correct.`, errors);
}

/** zlib's codes for a stream that is not what its Content-Encoding says (gzip, deflate, br). */
const isDecompressionFailure = (err: ErrorLike) => typeof err.code === 'string' && (/^Z_/.test(err.code) || /^ERR__/.test(err.code) || /BROTLI/.test(err.code));

/**
 * PostgreSQL data exceptions (SQLSTATE class 22: a value out of range, a byte sequence it cannot
 * store, a malformed literal). Input checks refuse these first and name the field; this is the net
 * under them, so a value the checks did not foresee is still a client error and not a crash.
 */
const isDataException = (err: ErrorLike) => typeof err.code === 'string' && /^22[0-9A-Z]{3}$/.test(err.code) && 'severity' in (err as object);

/** Body-parser errors carry a `type`; map the ones a client can cause to a clear problem. */
function fromBodyParser(err: ErrorLike): HttpError | undefined {
  switch (err.type) {
    case 'entity.parse.failed':
      return new BadRequestError('The request body is not valid JSON.');
    case 'entity.too.large':
      return new HttpError(413, 'payload-too-large', 'Request body too large', 'The request body is larger than this server accepts.');
    case 'encoding.unsupported':
    case 'charset.unsupported':
      return new HttpError(415, 'unsupported-encoding', 'Unsupported encoding', 'The request body uses an encoding this server does not accept.');
    default:
      break;
  }
  const status = err.status ?? err.statusCode;
  if (status === 400 && isDecompressionFailure(err)) {
    return new BadRequestError('The request body could not be decoded: it is not valid compressed data for its Content-Encoding.');
  }
  return undefined;
}

/**
 * Any other error that says it is a client's (http-errors sets `expose` on 4xx): answer with its
 * status and a generic text, never the message, which may quote the request.
 */
function fromClientError(err: ErrorLike): HttpError | undefined {
  const status = err.status ?? err.statusCode;
  if (typeof status !== 'number' || status < 400 || status > 499 || err.expose === false) return undefined;
  return new HttpError(status, 'bad-request', 'The request could not be understood', 'The request could not be understood.');
}

export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new NotFoundError(`No API route answers ${req.method} ${req.originalUrl.split('?')[0]}.`));
};

/**
 * The one error middleware: known errors become problem+json; anything else is logged
 * and answered with a generic 500 that reveals nothing of the server's internals.
 */
export function problemHandler(log: (message: string, error: unknown, fields?: Record<string, unknown>) => void = console.error): ErrorRequestHandler {
  return (err, req, res, next) => {
    if (res.headersSent) {
      // A late error (e.g. the session store failing after the answer went out): the answer is
      // complete, so keep the connection; only an unfinished answer has to be cut.
      if (res.writableEnded) {
        if (!isDatabaseUnavailable(err)) log('error after the response', err, { reqId: req.id, method: req.method, path: req.path });
        return;
      }
      return next(err);
    }
    const e: ErrorLike = err ?? {};
    let known: HttpError | undefined = err instanceof HttpError ? err : (httpErrorOf(err) ?? fromZod(e) ?? fromBodyParser(e) ?? fromClientError(e));
    if (!known && isDatabaseUnavailable(err)) {
      known = new ServiceUnavailableError('The database is not answering. Try again in a few seconds.');
    }
    if (!known && isDataException(e)) {
      known = new UnprocessableError('A value in the request cannot be stored (out of range or not valid text).');
    }
    if (!known) {
      log('unhandled error', err, { reqId: req.id, method: req.method, path: req.path });
      known = new HttpError(500, 'internal', 'Internal server error', 'Something went wrong on the server. The error has been logged.');
    }
    if (known.status === 503) res.set('Retry-After', String(retryAfterSeconds));
    res.status(known.status).type('application/problem+json').send(JSON.stringify(toProblem(known, req.originalUrl.split('?')[0])));
  };
}
