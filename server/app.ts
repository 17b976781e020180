import { existsSync } from 'node:fs';
import { join } from 'node:path';
import express, { type Express, type Request } from 'express';
import type { z } from 'zod';
import { BadgeSignInBody, InviteAcceptBody, ResetCompleteBody, ResetRequestBody, SignInBody } from '../shared/auth';
import cookieParser from 'cookie-parser';
import helmet from 'helmet';
import { rateLimit } from 'express-rate-limit';
import { pinoHttp } from 'pino-http';
import type { Deps } from './deps';
import { apiNotFound, errorHandler } from './http/error-handler';
import { mountRoutes } from './http/mount';
import { DbRateLimitStore } from './http/rate-limit-store';
import { isPg } from './db/dialect';
import type { AnyRoute } from './http/route';
import { SITE_CHANGED, withSiteEvents, type SiteChangeSink } from './picking/events';
import { routeTable } from './routes';
import { buildOpenApi } from './system/openapi';
import { registerJobKinds } from './workers/job-kinds';

export interface AppOptions {
  /** Built client to serve (dist/client); omitted in API tests. */
  clientDir?: string;
  routes?: readonly AnyRoute[];
}

/**
 * Raw request floods on the sign-in paths, per address per minute, counting only requests that are
 * not well-formed attempts (they cost nothing to refuse, but logs and sockets). Well-formed attempts
 * are never refused here: they are limited per account and per account + address, in the database
 * (server/auth/backoff.ts), so one noisy address cannot lock out the tablets behind the same router.
 */
export const MALFORMED_SIGN_IN_LIMIT_PER_MINUTE = 600;
const AUTH_ATTEMPT_BODIES: Record<string, z.ZodType> = {
  '/api/auth/sign-in': SignInBody,
  '/api/auth/badge-sign-in': BadgeSignInBody,
  '/api/auth/reset-request': ResetRequestBody,
  '/api/auth/reset': ResetCompleteBody,
  '/api/auth/invites/accept': InviteAcceptBody,
};
const wellFormedAttempt = (req: Request): boolean =>
  req.method === 'POST' && AUTH_ATTEMPT_BODIES[req.baseUrl + req.path.replace(/\/$/, '')]?.safeParse(req.body).success === true;

/** Builds the Express app; never listens (main.ts does). */
export function createApp(deps: Deps, options: AppOptions = {}): Express {
  const app = express();
  app.disable('x-powered-by');
  if (deps.config.TRUST_PROXY) app.set('trust proxy', 1);
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          'default-src': ["'self'"],
          'img-src': ["'self'", 'data:', 'blob:'],
          'style-src': ["'self'", "'unsafe-inline'"],
          'script-src': ["'self'"],
          'connect-src': ["'self'"],
          'frame-src': ["'self'", 'blob:'],
          'upgrade-insecure-requests': null,
        },
      },
    }),
  );
  app.use(
    pinoHttp({
      logger: deps.logger,
      // Never log cookies, tokens, passwords or PINs: only method, path and status.
      serializers: {
        req: (req: { method: string; url: string }) => ({ method: req.method, url: req.url.split('?')[0] }),
        res: (res: { statusCode: number }) => ({ statusCode: res.statusCode }),
      },
      autoLogging: { ignore: (req) => req.url === '/api/health' },
      // A 5xx answer is an error worth a look at any log level (the browser tests' run is checked for them).
      customLogLevel: (_req, res, err) => (err || res.statusCode >= 500 ? 'error' : 'info'),
    }),
  );
  // Board changes signalled while serving a request reach this app's live-board streams (events.ts);
  // with several instances on PostgreSQL they travel through the shared hub, so every instance's
  // streams hear them (this one included, through its own subscription).
  const hub = deps.events;
  const sink: SiteChangeSink = hub.shared ? { siteChanged: (siteId) => hub.publish(SITE_CHANGED, siteId) } : deps.boardStreams;
  if (hub.shared) hub.subscribe(SITE_CHANGED, (siteId) => deps.boardStreams.siteChanged(Number(siteId)));
  app.use((_req, _res, next) => withSiteEvents(sink, next));
  app.use(cookieParser());
  // Answers from the API hold private data: never stored by a browser or a proxy.
  app.use('/api', (_req, res, next) => {
    res.setHeader('Cache-Control', 'no-store');
    next();
  });
  app.use('/api', express.json({ limit: '2mb' }));
  app.use(
    Object.keys(AUTH_ATTEMPT_BODIES),
    rateLimit({
      windowMs: 60_000,
      limit: MALFORMED_SIGN_IN_LIMIT_PER_MINUTE,
      skip: wellFormedAttempt,
      // Several instances on PostgreSQL count one window per address in the database; one SQLite
      // process keeps the count in memory.
      ...(isPg(deps.db) ? { store: new DbRateLimitStore(deps.db) } : {}),
      standardHeaders: 'draft-8',
      legacyHeaders: false,
      handler: (_req, res) => {
        res.status(429).json({ error: { code: 'too_many_requests', message: 'Too many malformed sign-in requests from this address; wait a minute' } });
      },
    }),
  );

  const routes = options.routes ?? routeTable;
  // The OpenAPI document describes the routes this app mounted, built on first request.
  let openApi: unknown = null;
  app.locals.openApi = () => (openApi ??= buildOpenApi(routes, deps.version));
  // Heavy jobs of every kind run through this app's job runner (server/workers/jobs.ts).
  registerJobKinds(deps);
  mountRoutes(app, routes, deps);
  app.use('/api', apiNotFound);

  if (options.clientDir && existsSync(options.clientDir)) {
    const dir = options.clientDir;
    app.use(
      express.static(dir, {
        index: false,
        maxAge: '1h',
        // The service worker and the files it checks for updates are always revalidated, so a new
        // release reaches tablets on their next online load (hashed assets keep their hour).
        setHeaders: (res, path) => {
          if (/(^|[\\/])(sw\.js|index\.html|manifest\.webmanifest|workbox-[\w-]+\.js)$/.test(path)) res.setHeader('Cache-Control', 'no-cache');
        },
      }),
    );
    // Client-side routes: every other GET gets the app shell.
    app.get('/{*splat}', (_req, res) => {
      res.setHeader('Cache-Control', 'no-cache');
      res.sendFile(join(dir, 'index.html'));
    });
  }
  app.use(errorHandler(deps.logger));
  return app;
}
