/**
 * The Express application, built from its dependencies and started elsewhere (server/main.ts), so
 * tests can run it in-process with supertest: `supertest(createApp({ db, pool, sessionSecret }))`.
 */
import './native-hash';
import { existsSync } from 'node:fs';
import path from 'node:path';
import connectPgSimple from 'connect-pg-simple';
import express from 'express';
import session from 'express-session';
import helmet from 'helmet';
import type pg from 'pg';
import { pinoHttp } from 'pino-http';
import { authRoutes, type AuthRateLimit } from './auth/routes';
import { csrfProtection } from './auth/csrf';
import { createPassport } from './auth/passport';
import type { Database } from './db/client';
import { healthRoutes } from './health/routes';
import { apiNotFound, errorHandler } from './http/errors';
import { assertAllDeclared, type ApiRouter, type RouteDefinition, type RouterDeps } from './http/route';
import { AnswerCache, msFromEnv } from './http/answer-cache';
import { postgresRateLimitStores, type RateLimitStores } from './http/rate-limit-store';
import { publicAnswerKey } from './publishing/routes';
import { createLogger, type Logger } from './log';
import { mailRouters, MailService } from './mail/index';
import { teamRoutes } from './teams/routes';
import { worksheetServiceRouters, type WorksheetServiceDeps } from './worksheets/index';

export interface AppDeps {
  db: Database;
  /** The pool behind `db`; the session store uses it. */
  pool: pg.Pool;
  /** Signs the session cookie. Keep it stable across restarts, or every session ends. */
  sessionSecret: string;
  logger?: Logger;
  /** Secure cookies and HSTS, and trust X-Forwarded-* from a proxy on loopback. */
  production?: boolean;
  /** Folder with the built client (index.html); null or missing folder → a plain page at /. */
  clientDir?: string | null;
  authRateLimit?: AuthRateLimit;
  /**
   * Counters of the rate limiters. Default: PostgreSQL, shared by every process on the same
   * database with the same session secret (server/http/rate-limit-store.ts).
   */
  rateLimitStores?: RateLimitStores;
  /** Defaults to a connect-pg-simple store on `pool` without its prune timer; main.ts passes one that prunes. */
  sessionStore?: session.Store;
  /** Largest JSON body accepted (express size string). */
  jsonLimit?: string;
  /**
   * Outbox, links and mailbox access of the mail-backed flows (server/mail). Default: messages are
   * queued but not delivered; server/main.ts passes a started one (`startMail()`).
   */
  mail?: MailService;
  /** Evaluation pool and caches of the worksheet service (default: one per app, threads on first use). */
  evaluator?: WorksheetServiceDeps['evaluator'];
  /** Throttling of unknown/revoked published-link tokens. */
  publicRateLimit?: WorksheetServiceDeps['publicRateLimit'];
  /** Published answers kept in memory (default: PUBLIC_LINK_CACHE_MS, 1 s; 0 turns it off; key: publicAnswerKey). */
  publishedAnswers?: AnswerCache;
}

export const sessionCookieName = 'spreadproof.sid';

/**
 * Every API router. A new resource adds its `xyzRoutes(deps)` here; each of its routes then joins
 * the registry that test/server/authorization-matrix.test.ts checks.
 */
function apiRouters(
  deps: RouterDeps & { passport: ReturnType<typeof createPassport>; rateLimit?: AuthRateLimit; mail: MailService } & Omit<WorksheetServiceDeps, keyof RouterDeps>,
): ApiRouter[] {
  return [healthRoutes(deps), authRoutes(deps), teamRoutes(deps), ...worksheetServiceRouters(deps), ...mailRouters(deps)];
}

/** The Content-Security-Policy the client is built to satisfy: nothing inline but styles, nothing remote. */
export const contentSecurityPolicy = {
  defaultSrc: ["'self'"],
  scriptSrc: ["'self'"],
  scriptSrcAttr: ["'none'"],
  styleSrc: ["'self'", "'unsafe-inline'"],
  fontSrc: ["'self'"],
  imgSrc: ["'self'", 'data:'],
  connectSrc: ["'self'"],
  workerSrc: ["'self'", 'blob:'],
  objectSrc: ["'none'"],
  frameAncestors: ["'none'"],
  baseUri: ["'self'"],
  formAction: ["'self'"],
};

export function createApp(deps: AppDeps): express.Express {
  const logger = deps.logger ?? createLogger(process.env.LOG_LEVEL ?? 'silent');
  const production = deps.production ?? false;
  const app = express();
  app.disable('x-powered-by');
  // Behind a TLS-terminating proxy on the same machine, req.secure must reflect the original scheme.
  if (production) app.set('trust proxy', 'loopback');

  // Published links are read by anyone, often by many at once: a fresh answer leaves from memory
  // before logging, sessions and the routers. Its headers (helmet's included) are those of the
  // answer it repeats; the publishing router fills and evicts the entries.
  const publishedAnswers = deps.publishedAnswers ?? new AnswerCache({ ttlMs: msFromEnv('PUBLIC_LINK_CACHE_MS', 1000), key: publicAnswerKey });
  app.use(publishedAnswers.middleware());
  app.locals.publishedAnswers = publishedAnswers;

  app.use(
    pinoHttp({
      logger,
      // Method, path and status only: no headers (cookies, CSRF tokens) and no bodies (passwords).
      serializers: {
        req: (req: { method: string; url: string; id: unknown }) => ({ id: req.id, method: req.method, url: req.url.split('?')[0] }),
        res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
      },
      autoLogging: { ignore: (req) => !req.url?.startsWith('/api') },
    }),
  );

  app.use(
    helmet({
      contentSecurityPolicy: { useDefaults: false, directives: contentSecurityPolicy },
      strictTransportSecurity: production,
    }),
  );

  const store =
    deps.sessionStore ??
    new (connectPgSimple(session))({ pool: deps.pool, tableName: 'session', createTableIfMissing: false, pruneSessionInterval: false });

  const passport = createPassport(deps.db);

  const api = express.Router();
  api.use((_req, res, next) => {
    res.set('Cache-Control', 'no-store');
    next();
  });
  api.use(express.json({ limit: deps.jsonLimit ?? '1mb' }));
  api.use(
    session({
      name: sessionCookieName,
      secret: deps.sessionSecret,
      store,
      resave: false,
      saveUninitialized: false,
      cookie: { httpOnly: true, sameSite: 'lax', secure: production, maxAge: 7 * 24 * 60 * 60 * 1000 },
    }),
  );
  api.use(passport.session());
  api.use(csrfProtection);

  const registry: RouteDefinition[] = [];
  for (const router of apiRouters({
    db: deps.db,
    logger,
    passport,
    rateLimit: deps.authRateLimit,
    rateLimitStores: deps.rateLimitStores ?? postgresRateLimitStores(deps.db, deps.sessionSecret),
    mail: deps.mail ?? new MailService({ db: deps.db, logger }),
    evaluator: deps.evaluator,
    publicRateLimit: deps.publicRateLimit,
    publishedAnswers,
  })) {
    if (!router.mountPath.startsWith('/api/')) throw new Error(`API router mounted outside /api: ${router.mountPath}`);
    assertAllDeclared(router);
    api.use(router.mountPath.slice('/api'.length), router.router);
    registry.push(...router.definitions);
  }
  app.locals.routeRegistry = registry;

  api.use(apiNotFound);
  app.use('/api', api);

  mountClient(app, deps.clientDir ?? null);
  app.use(errorHandler(logger));
  return app;
}

/** The built Angular app, with every non-API GET falling back to index.html for client-side routes. */
function mountClient(app: express.Express, clientDir: string | null): void {
  const index = clientDir ? path.join(clientDir, 'index.html') : null;
  if (!clientDir || !index || !existsSync(index)) {
    app.get('/', (_req, res) => {
      res
        .type('text/plain')
        .send('Spreadproof server is running. The client has not been built yet: run `npm start` once client/src exists.\n');
    });
    return;
  }
  app.use(
    express.static(clientDir, {
      index: false,
      setHeaders: (res, file) => {
        // Bundles carry a content hash in their name; index.html must always be fetched fresh.
        const hashed = /[.-][A-Z0-9]{8,}\.(js|css|woff2?|ttf)$/i.test(path.basename(file));
        res.setHeader('Cache-Control', hashed ? 'public, max-age=31536000, immutable' : 'no-cache');
      },
    }),
  );
  app.get('/{*splat}', (req, res, next) => {
    if (!req.accepts('html')) {
      next();
      return;
    }
    res.setHeader('Cache-Control', 'no-cache');
    res.sendFile(index);
  });
}
