import type { ErrorRequestHandler, RequestHandler } from 'express';

/** One field-level problem, located by a JSON pointer into the request body (RFC 6901). */
export interface FieldProblem {
  pointer: string;
  detail: string;
}

/** RFC 9457 problem details. */
export interface Problem {
  type: string;
  title: string;
  status: number;
  detail?: string;
  instance?: string;
  errors?: FieldProblem[];
}

const PROBLEM_BASE = 'https://isobar.example/problems/';

/** An error that knows its HTTP status and how to describe itself to the client. */
export class HttpError extends Error {
  constructor(
    public readonly status: number,
    public readonly slug: string,
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
  constructor(detail: string) {
    super(503, 'service-unavailable', 'Service unavailable', detail);
  }
}

export function toProblem(error: HttpError, instance?: string): Problem {
  return {
    type: PROBLEM_BASE + error.slug,
    title: error.title,
    status: error.status,
    detail: error.message,
    ...(instance ? { instance } : {}),
    ...(error.errors?.length ? { errors: error.errors } : {}),
    ...(error.extensions ?? {}),
  };
}

/** Body-parser errors carry a `type`; map the ones a client can cause to a clear problem. */
function fromBodyParser(err: { type?: string; status?: number }): HttpError | undefined {
  switch (err.type) {
    case 'entity.parse.failed':
      return new BadRequestError('The request body is not valid JSON.');
    case 'entity.too.large':
      return new HttpError(413, 'payload-too-large', 'Request body too large', 'The request body is larger than this server accepts.');
    case 'encoding.unsupported':
    case 'charset.unsupported':
      return new HttpError(415, 'unsupported-encoding', 'Unsupported encoding', 'The request body uses an encoding this server does not accept.');
    default:
      return undefined;
  }
}

export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new NotFoundError(`No API route answers ${req.method} ${req.originalUrl.split('?')[0]}.`));
};

/**
 * The one error middleware: known errors become problem+json; anything else is logged
 * and answered with a generic 500 that reveals nothing of the server's internals.
 */
export function problemHandler(log: (message: string, error: unknown) => void = console.error): ErrorRequestHandler {
  return (err, req, res, next) => {
    if (res.headersSent) return next(err);
    let known: HttpError | undefined = err instanceof HttpError ? err : fromBodyParser(err ?? {});
    if (!known) {
      log(`Unhandled error on ${req.method} ${req.originalUrl}`, err);
      known = new HttpError(500, 'internal', 'Internal server error', 'Something went wrong on the server. The error has been logged.');
    }
    res.status(known.status).type('application/problem+json').send(JSON.stringify(toProblem(known, req.originalUrl.split('?')[0])));
  };
}
