import session from 'express-session';
import connectPgSimple from 'connect-pg-simple';
import type { Pool } from 'pg';
import type { RequestHandler } from 'express';
import type { DataSource } from 'typeorm';
import type { Config } from '../config';
import type { Role } from '../../shared/auth/permissions';
import { defaultLogger, safeError, type Logger } from '../log';
import { poolOf } from '../db/prepared';

/** What a signed-in session holds. */
export interface SessionAuth {
  userId: string;
  subject: string;
  displayName: string;
  email: string;
  role: Role | null;
  /** Kept to end the session at the provider on sign-out. */
  idToken?: string;
  /** When this session began (ms): the absolute session limit counts from here. */
  signedInAt: number;
  /**
   * When the identity provider last confirmed who the user is (ms, the ID token's `auth_time`):
   * signing asks for a recent one. Without it (no auth_time from the provider, or a session from before this field) signing asks again.
   */
  authenticatedAt?: number;
}

/** An authorization request in flight (state, nonce and PKCE verifier bind the callback to it). */
export interface PendingSignIn {
  state: string;
  nonce: string;
  codeVerifier: string;
  returnTo: string | null;
  startedAt: number;
  /** A renewed confirmation of who the user is (for signing): the provider must ask again. */
  reauth?: boolean;
}

declare module 'express-session' {
  interface SessionData {
    auth?: SessionAuth;
    pending?: PendingSignIn;
  }
}

export const sessionCookieName = 'isobar.sid';

type Callback = (err?: unknown) => void;
type PgStoreClass = ReturnType<typeof connectPgSimple>;

/**
 * connect-pg-simple's store, made safe against a save that lands after a sign-out: express-session
 * sends a response's headers before its end-of-request save finishes, and that save is an upsert.
 * Ending a session leaves its id in `http_session_ended` (in the same statement as the delete), and
 * a save never writes an id found there, so a late save cannot bring an ended session back.
 */
function endedSessionAwareStore(Base: PgStoreClass, pool: Pool, maxAgeMs: number, touchStepMs: number) {
  /**
   * The expiry last known to be stored for a session id: as read by each request, and as written by
   * a touch. It is kept after a touch (not forgotten), so that of several requests of one session in
   * flight at once (a page loading its data in parallel) only the first writes a moved expiry.
   */
  const storedExpiry = new Map<string, number>();
  const remember = (sid: string, expiresMs: number) => {
    if (storedExpiry.size > 100_000) storedExpiry.clear(); // one entry per recent session: a bound, then start again
    storedExpiry.set(sid, expiresMs);
  };
  return class EndedSessionAwareStore extends Base {
    override get(sid: string, fn: (err: unknown, sess?: session.SessionData | null) => void): void {
      pool
        // Read on every request: a named statement, planned once per pooled connection.
        .query({ name: 'isobar_session_read', text: `SELECT sess, extract(epoch FROM expire) * 1000 AS expire_ms FROM http_session WHERE sid = $1 AND expire >= now()`, values: [sid] })
        .then(
          ({ rows: [row] }) => {
            if (!row) return fn(null, null);
            let sess: session.SessionData;
            try {
              sess = typeof row.sess === 'string' ? JSON.parse(row.sess) : row.sess;
            } catch {
              return fn(null, null); // unreadable: treated as no session
            }
            remember(sid, Number(row.expire_ms));
            fn(null, sess);
          },
          (err) => fn(err),
        );
    }

    /**
     * Each request moves the idle expiry forward. Writing that on every request costs a row update
     * per read; instead it is written only once it moves by more than `touchStepMs` (a tenth of the
     * idle limit), so an idle session ends between 90% and 100% of the limit after its last request.
     */
    override touch(sid: string, sess: session.SessionData, fn?: Callback): void {
      const known = storedExpiry.get(sid);
      const next = sess.cookie?.expires ? new Date(sess.cookie.expires).getTime() : Date.now() + maxAgeMs;
      if (known !== undefined && next - known < touchStepMs) return fn?.();
      remember(sid, next); // the requests of this session that follow need not write it again
      pool.query(`UPDATE http_session SET expire = to_timestamp($1) WHERE sid = $2`, [next / 1000, sid]).then(
        () => fn?.(),
        (err) => {
          storedExpiry.delete(sid); // not written: the next request tries again
          fn?.(err);
        },
      );
    }

    override set(sid: string, sess: session.SessionData, fn?: Callback): void {
      storedExpiry.delete(sid);
      const expires = sess.cookie?.expires ? new Date(sess.cookie.expires).getTime() : Date.now() + maxAgeMs;
      pool
        .query(
          `INSERT INTO http_session (sess, expire, sid)
           SELECT $1::json, to_timestamp($2), $3::varchar WHERE NOT EXISTS (SELECT 1 FROM http_session_ended WHERE sid = $3::varchar)
           ON CONFLICT (sid) DO UPDATE SET sess = $1::json, expire = to_timestamp($2)`,
          [sess, expires / 1000, sid],
        )
        .then(() => fn?.(), (err) => fn?.(err));
    }

    override destroy(sid: string, fn?: Callback): void {
      storedExpiry.delete(sid);
      pool
        .query(
          `WITH gone AS (DELETE FROM http_session WHERE sid = $1)
           INSERT INTO http_session_ended (sid) VALUES ($1) ON CONFLICT (sid) DO NOTHING`,
          [sid],
        )
        .then(() => fn?.(), (err) => fn?.(err));
    }

    /** Expired sessions (the base store's job), then ended ids older than any session could live. */
    override pruneSessions(fn?: (err: Error) => void): void {
      super.pruneSessions((err?: Error) => {
        if (err) return fn?.(err);
        pool
          .query(`DELETE FROM http_session_ended WHERE ended_at < now() - make_interval(secs => $1)`, [(2 * maxAgeMs) / 1000])
          .then(
            () => fn?.(undefined as unknown as Error),
            (e: Error) => fn?.(e),
          );
      });
    }
  };
}


/**
 * Sessions in PostgreSQL: HttpOnly, SameSite=Lax cookie (Lax, not Strict, so the provider's redirect
 * back to the callback carries it), Secure over HTTPS, idle timeout renewed on each request.
 */
export function createSessionStore(config: Config, dataSource: DataSource, logger: Logger = defaultLogger()): session.Store {
  const pool = poolOf(dataSource);
  const Store = endedSessionAwareStore(connectPgSimple(session), pool, config.session.maxHours * 3_600_000, (config.session.idleMinutes * 60_000) / 10);
  return new Store({
    pool,
    tableName: 'http_session',
    createTableIfMissing: false,
    // Its default prints the error with console.error; log it as data without values instead.
    errorLog: (...args: unknown[]) => logger.warn({ err: safeError(args.find((a) => a instanceof Error)) }, 'session store query failed'),
    pruneSessionInterval: config.env === 'test' ? false : 15 * 60,
  });
}

/**
 * Sessions, kept through a database outage: when the store cannot be read, express-session passes
 * the error on with no session loaded, and would then "destroy" the id at the end of the request (it
 * sees a session id without a session) — ending a valid session for good once the database is back.
 * Forgetting the id for this request only keeps the stored session as it was; the error is answered
 * (503 when the database is unreachable) and the next request reads the session again.
 */
export function sessionMiddleware(config: Config, dataSource: DataSource, logger?: Logger): RequestHandler {
  const inner = expressSession(config, dataSource, logger);
  return (req, res, next) =>
    inner(req, res, (err?: unknown) => {
      if (err && !req.session) (req as { sessionID?: string }).sessionID = undefined;
      next(err);
    });
}

function expressSession(config: Config, dataSource: DataSource, logger?: Logger): RequestHandler {
  const idleMs = config.session.idleMinutes * 60_000;
  return session({
    name: sessionCookieName,
    secret: config.sessionSecret,
    store: createSessionStore(config, dataSource, logger),
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
