import type { RequestHandler } from 'express';
import type { Config } from '../config';
import { HttpError } from '../http/problem';

const safeMethods = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * Cross-site request forgery guard for state-changing requests: the session cookie is SameSite=Lax
 * (so other sites' POSTs carry no cookie in current browsers), and as a second, browser-independent
 * line every POST/PUT/PATCH/DELETE must come from an allowed Origin (or, lacking one, Referer).
 * A request with neither header is refused: browsers always send Origin on such requests.
 */
export function requireSameOrigin(config: Config): RequestHandler {
  const allowed = new Set(config.allowedOrigins);
  return (req, _res, next) => {
    if (safeMethods.has(req.method)) return next();
    const origin = req.get('origin') ?? originOf(req.get('referer'));
    if (origin && allowed.has(origin)) return next();
    next(
      new HttpError(
        403,
        'cross-site-request',
        'Cross-site request refused',
        origin ? `Requests from ${origin} may not change data here.` : 'A request that changes data must say where it comes from (Origin header).',
      ),
    );
  };
}

function originOf(url: string | undefined): string | undefined {
  if (!url) return undefined;
  try {
    return new URL(url).origin;
  } catch {
    return undefined;
  }
}

/** Ends a session that has passed its absolute limit, however active it has been. */
export function enforceSessionLimit(config: Config): RequestHandler {
  const maxMs = config.session.maxHours * 3_600_000;
  return (req, _res, next) => {
    const auth = req.session?.auth;
    if (auth && Date.now() - auth.signedInAt > maxMs) {
      req.sessionEnded = true;
      // A fresh, empty session rather than none, so a sign-in can start on this very request.
      req.session.regenerate((error) => next(error));
      return;
    }
    next();
  };
}
