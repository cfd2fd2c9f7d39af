import type { z } from 'zod';
import { BadRequestError, pointerOf, type FieldProblem } from './problem';

export { pointerOf };

/** Parses at the edge with the shared schema; every issue comes back located by a JSON pointer. */
export function parseOrThrow<S extends z.ZodType>(schema: S, value: unknown, what = 'The request'): z.output<S> {
  const result = schema.safeParse(value);
  if (result.success) return result.data;
  const errors: FieldProblem[] = result.error.issues.map((i) => ({ pointer: pointerOf(i.path), detail: i.message }));
  throw new BadRequestError(`${what} has ${errors.length === 1 ? 'a field' : `${errors.length} fields`} to correct.`, errors);
}
