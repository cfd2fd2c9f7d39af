import type { SessionAuth } from '../auth/session';
import { ReauthenticationRequiredError } from './errors';

/**
 * An electronic signature confirms who signs: the person must have confirmed who they are at the
 * identity provider within the last `minutes`. A sign-in without the provider's own time of
 * authentication, or an older one, must be renewed; the renewal comes back to `returnTo`.
 */
export function requireRecentSignIn(auth: Pick<SessionAuth, 'authenticatedAt'>, minutes: number, returnTo: string, now: number = Date.now()): void {
  if (auth.authenticatedAt === undefined || now - auth.authenticatedAt > minutes * 60_000) {
    throw new ReauthenticationRequiredError(minutes, returnTo);
  }
}
