import fs from 'node:fs';
import path from 'node:path';
import express, { type Express } from 'express';
import compression from 'compression';
import expressStaticGzip from 'express-static-gzip';
import helmet from 'helmet';
import type { DataSource } from 'typeorm';
import type { Config } from './config';
import { apiNotFound, problemHandler } from './http/problem';
import { refuseImpossibleValues } from './http/input-safety';
import { routerFrom, type ApiRoute } from './http/routes';
import { identityProvider, type IdentityProvider } from './auth/oidc';
import { sessionMiddleware } from './auth/session';
import { enforceSessionLimit, requireSameOrigin } from './auth/request-guards';
import { healthRoutes } from './routes/health';
import { authRoutes } from './routes/auth';
import { auditRoutes } from './routes/audit';
import { studyRoutes } from './routes/studies';
import { settingsRoutes } from './routes/settings';
import { adminRoutes } from './routes/admin';
import { reportRoutes } from './routes/reports';
import { deliveryRoutes } from './routes/delivery';
import { codingRoutes } from './routes/coding';
import { mailRoutes } from './routes/mail';
import { turnaroundRoutes } from './routes/turnaround';
import { diskStorage, type AttachmentStorage } from './attachments/storage';
import { createLogger, requestLogger, type Logger } from './log';

export interface AppDeps {
  config: Config;
  dataSource: DataSource;
  /** Structured logger (pino); defaults to one at the configured level on stdout. */
  logger?: Logger;
  /** Where unexpected errors go; defaults to the logger. */
  log?: (message: string, error?: unknown, fields?: Record<string, unknown>) => void;
  /** The identity provider; defaults to the one in the config (tests may pass their own). */
  idp?: IdentityProvider;
  /** Where attachments are kept; defaults to the folder in the config. */
  storage?: AttachmentStorage;
}

/** Every `/api` route with the access it needs: the router is built from this list alone. */
export function apiRoutes(deps: Required<Pick<AppDeps, 'config' | 'dataSource' | 'idp' | 'storage'>>): ApiRoute[] {
  return [
    ...healthRoutes(deps),
    ...authRoutes(deps),
    ...studyRoutes(deps),
    ...settingsRoutes(deps),
    ...adminRoutes(deps),
    ...reportRoutes(deps),
    ...auditRoutes(deps),
    ...deliveryRoutes(deps),
    ...codingRoutes(deps),
    ...mailRoutes(deps),
    ...turnaroundRoutes(deps),
  ];
}

/**
 * Builds the Express app without listening, so tests can drive it with supertest.
 * `/api` answers JSON (errors as problem+json); everything else is the web app.
 */
export function createApp({
  config,
  dataSource,
  logger = createLogger(config.logLevel),
  log = (message, error, fields) => logger.error({ ...fields, err: error }, message),
  idp = identityProvider(config.oidc),
  storage = diskStorage(path.resolve(config.attachments.dir)),
}: AppDeps): Express {
  const app = express();
  app.disable('x-powered-by');
  // API answers are never cached (Cache-Control: no-store), so hashing every body into an ETag is
  // wasted work; the web build's files get theirs from the static file server, which makes its own.
  app.set('etag', false);
  app.use(requestLogger(logger));
  // Forwarded addresses only from a configured proxy: otherwise anyone could set X-Forwarded-For.
  app.set('trust proxy', config.trustProxy.length ? config.trustProxy : false);

  app.use(
    helmet({
      contentSecurityPolicy: {
        useDefaults: true,
        directives: {
          // react-native-web writes its styles into <style> tags at run time.
          'style-src': ["'self'", "'unsafe-inline'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          'font-src': ["'self'", 'data:'],
          'connect-src': ["'self'"],
          'upgrade-insecure-requests': config.publicUrl.startsWith('https:') ? [] : null,
        },
      },
      strictTransportSecurity: config.publicUrl.startsWith('https:'),
    }),
  );

  const api = express.Router();
  // JSON answers compressed (the worklist's rows travel a phone's network); PDFs and files are
  // compressed already, and a sign request is tiny, so only text above 1 KB is worth the CPU.
  api.use(compression({ threshold: 1024, filter: (req, res) => /json|text|csv/.test(String(res.getHeader('Content-Type') ?? '')) && compression.filter(req, res) }));
  api.use((_req, res, next) => {
    // Patient data must never sit in a browser or proxy cache (nor come back with the back button).
    res.set('Cache-Control', 'no-store');
    next();
  });
  api.use(requireSameOrigin(config));
  api.use(express.json({ limit: config.jsonBodyLimit }));
  api.use(refuseImpossibleValues);
  const sessions = sessionMiddleware(config, dataSource, logger);
  // Health needs no session, so it answers "database down" itself rather than the session store's error.
  api.use((req, res, next) => (req.path === '/health' ? next() : sessions(req, res, next)));
  api.use(enforceSessionLimit(config));
  api.use(routerFrom(apiRoutes({ config, dataSource, idp, storage }), dataSource));
  api.use(apiNotFound);
  app.use('/api', api);

  serveWebApp(app, path.resolve(config.webDist));

  app.use(problemHandler(log));
  return app;
}

/**
 * The exported web build: hashed bundles cached for a year, the page itself never cached. The build
 * step writes brotli and gzip copies beside each text file (scripts/precompress-web.ts); the copy the
 * browser accepts is sent with its Content-Encoding and `Vary: Accept-Encoding`. Exported for the
 * first-load benchmark, which serves its baseline app the same way.
 */
export function serveWebApp(app: Express, distDir: string): void {
  const indexFile = path.join(distDir, 'index.html');
  app.use(
    expressStaticGzip(distDir, {
      enableBrotli: true,
      orderPreference: ['br', 'gzip'],
      index: false,
      serveStatic: {
        index: false,
        setHeaders(res, filePath) {
          if (filePath.includes(`${path.sep}_expo${path.sep}`) || filePath.includes(`${path.sep}assets${path.sep}`)) {
            res.setHeader('Cache-Control', 'public, max-age=31536000, immutable');
          }
        },
      },
    }),
  );
  // Single-page app: any other GET is a client-side route.
  app.get('/{*splat}', (_req, res) => {
    if (!fs.existsSync(indexFile)) {
      res.status(503).type('text/plain').send('The web app has not been built yet. Run `npm start`.');
      return;
    }
    // Relative to the build's folder, so a build kept under a dot-folder (e.g. .data/) is served too.
    res.set('Cache-Control', 'no-store').sendFile('index.html', { root: distDir });
  });
}
