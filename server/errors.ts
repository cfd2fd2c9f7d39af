/**
 * The domain errors every area shares. They say what went wrong in the product's terms and know
 * nothing of HTTP: `server/http/domain-errors.ts` alone turns them (and each area's own errors) into
 * statuses and problem types.
 */

import type { FieldProblem } from '../shared/http/problem';

/** One field a domain error points at (a JSON pointer into the request, RFC 6901) and what is wrong there. */
export type FieldIssue = FieldProblem;

/** Nothing by this id (a study, a report version, a code line): the detail names what was looked for. */
export class RecordNotFoundError extends Error {
  constructor(detail: string) {
    super(detail);
    this.name = 'RecordNotFoundError';
  }
}

/** The request asks for something that cannot be done as asked (a date in the past, a host not allowed). */
export class InvalidRequestError extends Error {
  constructor(
    detail: string,
    public readonly issues?: FieldIssue[],
  ) {
    super(detail);
    this.name = 'InvalidRequestError';
  }
}

/** A value is well formed but cannot be accepted (an operator who is not a physician). */
export class UnacceptableValueError extends Error {
  constructor(
    detail: string,
    public readonly issues?: FieldIssue[],
  ) {
    super(detail);
    this.name = 'UnacceptableValueError';
  }
}

/** A service the server depends on (other than the database) did not answer as it should. */
export class ServiceNotAnsweringError extends Error {
  constructor(detail: string) {
    super(detail);
    this.name = 'ServiceNotAnsweringError';
  }
}
