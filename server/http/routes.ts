import { Router, type RequestHandler } from 'express';
import type { DataSource } from 'typeorm';
import { can, type Permission } from '../../shared/auth/permissions';
import { auditContext, recordAudit } from '../audit/audit';
import { BadRequestError, HttpError, pointerOf } from './problem';
import { safeDecode } from './input-safety';

/** What a route needs: anyone, any signed-in user (even without a role), or a permission. */
export type Access = 'public' | 'signed-in' | Permission;

export interface ApiRoute {
  method: 'get' | 'post' | 'put' | 'patch' | 'delete';
  /** Express path under /api, e.g. `/studies/:id`. */
  path: string;
  access: Access;
  summary: string;
  handlers: RequestHandler[];
}

class UnauthorizedError extends HttpError {
  constructor(detail = 'Sign in to continue.') {
    super(401, 'unauthorized', 'Not signed in', detail);
  }
}
class ForbiddenError extends HttpError {
  constructor(detail = 'Your role does not allow this.') {
    super(403, 'forbidden', 'Not allowed', detail);
  }
}

/** The guard every route passes: 401 without a session, 403 (audited) without the permission. */
function guard(access: Access, dataSource: DataSource): RequestHandler {
  return async (req, _res, next) => {
    if (access === 'public') return next();
    const auth = req.session?.auth;
    if (!auth) return next(new UnauthorizedError(req.sessionEnded ? 'Your session has ended. Sign in again.' : undefined));
    if (access === 'signed-in' || can(auth.role, access)) return next();
    await recordAudit(dataSource, {
      ...auditContext(req),
      action: 'access-denied',
      outcome: 'denied',
      detail: { method: req.method, path: req.originalUrl.split('?')[0], needs: access },
    });
    next(new ForbiddenError());
  };
}

/** Builds the router from the declared routes only, so no route exists without its access rule. */
export function routerFrom(routes: ApiRoute[], dataSource: DataSource): Router {
  const router = Router();
  router.use(refuseMalformedPath(routes));
  for (const route of routes) {
    router[route.method](route.path, guard(route.access, dataSource), ...route.handlers);
  }
  return router;
}

/**
 * A path segment with a malformed percent-escape (`%`, `%ff`) cannot be decoded; answer 400 and
 * name the route parameter it fills (`/id`), found by matching the raw segments against the routes.
 */
function refuseMalformedPath(routes: ApiRoute[]): RequestHandler {
  return (req, _res, next) => {
    if (!req.path.includes('%')) return next();
    const segments = req.path.split('/');
    const bad = segments.map((s, i) => (safeDecode(s) === null ? i : -1)).filter((i) => i >= 0);
    if (bad.length === 0) return next();
    const method = req.method.toLowerCase() === 'head' ? 'get' : req.method.toLowerCase();
    let names: string[] = ['path'];
    for (const route of routes) {
      const pattern = route.path.split('/');
      if (route.method !== method || pattern.length !== segments.length) continue;
      if (!pattern.every((p, i) => p.startsWith(':') || p === segments[i])) continue;
      names = bad.map((i) => (pattern[i].startsWith(':') ? pattern[i].slice(1) : 'path'));
      break;
    }
    next(new BadRequestError('The address has a malformed percent-escape.', names.map((n) => ({ pointer: pointerOf([n]), detail: 'Not valid percent-encoded UTF-8.' }))));
  };
}

declare module 'express-serve-static-core' {
  interface Request {
    /** Set when the request arrived with a session that had passed its absolute time limit. */
    sessionEnded?: boolean;
  }
}
