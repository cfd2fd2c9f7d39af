import type { z } from 'zod';
import type { Request } from 'express';
import { uuidPattern } from '../../shared/uuid';
import { BadRequestError, NotFoundError, pointerOf, type FieldProblem } from './problem';

export { pointerOf };

/** Parses at the edge with the shared schema; every issue comes back located by a JSON pointer. */
export function parseOrThrow<S extends z.ZodType>(schema: S, value: unknown, what = 'The request'): z.output<S> {
  const result = schema.safeParse(value);
  if (result.success) return result.data;
  const errors: FieldProblem[] = result.error.issues.map((i) => ({ pointer: pointerOf(i.path), detail: i.message }));
  throw new BadRequestError(`${what} has ${errors.length === 1 ? 'a field' : `${errors.length} fields`} to correct.`, errors);
}

/** The route's `:id` when it is a record id; anything else names no record (404, never a database error). */
export function uuidParam(req: Request, what = 'record'): string {
  const id = String(req.params.id);
  if (!uuidPattern.test(id)) throw new NotFoundError(`No ${what} has this id.`);
  return id;
}
