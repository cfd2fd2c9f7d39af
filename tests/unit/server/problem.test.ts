import { describe, expect, it } from 'vitest';
import { HttpError, ServiceUnavailableError, toProblem } from '../../../server/http/problem';

// RFC 9457 §3.1: type, title, status, detail and instance are the members the RFC defines; extensions sit beside them.
describe('a problem document', () => {
  it('keeps a 503\'s own type, title, status and detail when an extension carries the same names', () => {
    const error = new ServiceUnavailableError('The database is not answering.', { retryAfterSeconds: 5, status: 200, type: 'about:blank', title: 'OK', detail: 'fine' });
    expect(toProblem(error, '/api/studies')).toEqual({
      retryAfterSeconds: 5,
      type: 'https://isobar.example/problems/service-unavailable',
      title: 'Service unavailable',
      status: 503,
      detail: 'The database is not answering.',
      instance: '/api/studies',
    });
  });

  it('keeps any error\'s fixed members and field problems above its extensions', () => {
    const error = new HttpError(409, 'stale-version', 'Changed by someone else', 'Reload and try again.', [{ pointer: '/version', detail: 'stale' }], { current: { version: 3 }, status: 500, errors: [] });
    expect(toProblem(error)).toEqual({
      current: { version: 3 },
      type: 'https://isobar.example/problems/stale-version',
      title: 'Changed by someone else',
      status: 409,
      detail: 'Reload and try again.',
      errors: [{ pointer: '/version', detail: 'stale' }],
    });
  });
});
