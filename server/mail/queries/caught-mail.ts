import { RecordNotFoundError, ServiceNotAnsweringError } from '../../errors';
import type { CaughtMessage } from '../../../shared/mail/caught';
import { readMessage } from '../read-message';

export type { CaughtMessage };

const notInUse = 'Caught mail exists only where the local mail stand-in is in use (development and tests); this server sends mail to a real relay.';

/**
 * The mail the local stand-in caught, newest first. Not found when the stand-in is not in use
 * (`listUrl` null: production, real services) or not running.
 */
export async function listCaughtMail(listUrl: string | null, { timeoutMs = 3000 } = {}): Promise<{ items: CaughtMessage[] }> {
  if (!listUrl) throw new RecordNotFoundError(notInUse);
  let response: Response;
  try {
    response = await fetch(listUrl, { signal: AbortSignal.timeout(timeoutMs), redirect: 'error' });
  } catch {
    throw new RecordNotFoundError('The local mail stand-in is not running: start it with `npm start` (or run it with the tests).');
  }
  if (!response.ok) throw new ServiceNotAnsweringError('The local mail stand-in did not answer with its list of caught mail.');
  const body = (await response.json().catch(() => null)) as { items?: unknown } | null;
  if (!body || !Array.isArray(body.items)) throw new ServiceNotAnsweringError('The local mail stand-in answered with something that is not a list of caught mail.');
  return {
    items: (body.items as Array<{ id: number; from: string; to: string[]; receivedAt: string; raw: string }>).map((m) => {
      const read = readMessage(String(m.raw ?? ''));
      return { id: Number(m.id), receivedAt: String(m.receivedAt), from: String(m.from ?? ''), to: Array.isArray(m.to) ? m.to.map(String) : [], subject: read.subject, headers: read.headers, text: read.text };
    }),
  };
}
