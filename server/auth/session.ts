import session from 'express-session';
import connectPgSimple from 'connect-pg-simple';
import type { Pool } from 'pg';
import type { RequestHandler } from 'express';
import type { DataSource } from 'typeorm';
import type { Config } from '../config';
import type { Role } from '../../shared/auth/permissions';

/** What a signed-in session holds. */
export interface SessionAuth {
  userId: string;
  subject: string;
  displayName: string;
  email: string;
  role: Role | null;
  /** Kept to end the session at the provider on sign-out. */
  idToken?: string;
  signedInAt: number;
}

/** An authorization request in flight (state, nonce and PKCE verifier bind the callback to it). */
export interface PendingSignIn {
  state: string;
  nonce: string;
  codeVerifier: string;
  returnTo: string | null;
  startedAt: number;
}

declare module 'express-session' {
  interface SessionData {
    auth?: SessionAuth;
    pending?: PendingSignIn;
  }
}

export const sessionCookieName = 'isobar.sid';

/** The pg pool TypeORM already holds, so sessions need no second pool. */
function poolOf(dataSource: DataSource): Pool {
  return (dataSource.driver as unknown as { master: Pool }).master;
}

/**
 * Sessions in PostgreSQL: HttpOnly, SameSite=Lax cookie (Lax, not Strict, so the provider's redirect
 * back to the callback carries it), Secure over HTTPS, idle timeout renewed on each request.
 */
export function sessionMiddleware(config: Config, dataSource: DataSource): RequestHandler {
  const PgStore = connectPgSimple(session);
  const idleMs = config.session.idleMinutes * 60_000;
  return session({
    name: sessionCookieName,
    secret: config.sessionSecret,
    store: new PgStore({
      pool: poolOf(dataSource),
      tableName: 'http_session',
      createTableIfMissing: false,
      pruneSessionInterval: config.env === 'test' ? false : 15 * 60,
    }),
    resave: false,
    saveUninitialized: false,
    rolling: true,
    unset: 'destroy',
    proxy: undefined,
    cookie: {
      httpOnly: true,
      sameSite: 'lax',
      secure: config.session.secure,
      maxAge: idleMs,
      path: '/',
    },
  });
}

/** Promise forms of the callback-style session methods. */
export const regenerateSession = (s: session.Session) => new Promise<void>((ok, fail) => s.regenerate((e) => (e ? fail(e) : ok())));
export const saveSession = (s: session.Session) => new Promise<void>((ok, fail) => s.save((e) => (e ? fail(e) : ok())));
export const destroySession = (s: session.Session) => new Promise<void>((ok, fail) => s.destroy((e) => (e ? fail(e) : ok())));
