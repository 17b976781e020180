import { existsSync } from 'node:fs';
import { join } from 'node:path';
import express, { type Express } from 'express';
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
import { routeTable } from './routes';

export interface AppOptions {
  /** Built client to serve (dist/client); omitted in API tests. */
  clientDir?: string;
  routes?: readonly AnyRoute[];
}

/** Sign-in attempts per IP per 15 minutes: room for 100 tablets behind one NAT at shift start. */
export const SIGN_IN_LIMIT_PER_IP = 1000;

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
    }),
  );
  app.use(cookieParser());
  app.use('/api', express.json({ limit: '2mb' }));
  app.use(
    ['/api/auth/sign-in', '/api/auth/badge-sign-in', '/api/auth/reset-request', '/api/auth/reset', '/api/auth/invites/accept'],
    rateLimit({
      windowMs: 15 * 60_000,
      limit: SIGN_IN_LIMIT_PER_IP,
      // Several instances on PostgreSQL count one window per address in the database; one SQLite
      // process keeps the count in memory.
      ...(isPg(deps.db) ? { store: new DbRateLimitStore(deps.db) } : {}),
      standardHeaders: 'draft-8',
      legacyHeaders: false,
      handler: (_req, res) => {
        res.status(429).json({ error: { code: 'too_many_requests', message: 'Too many sign-in attempts from this address; wait a few minutes' } });
      },
    }),
  );

  mountRoutes(app, options.routes ?? routeTable, deps);
  app.use('/api', apiNotFound);

  if (options.clientDir && existsSync(options.clientDir)) {
    const dir = options.clientDir;
    app.use(express.static(dir, { index: false, maxAge: '1h' }));
    // Client-side routes: every other GET gets the app shell.
    app.get('/{*splat}', (_req, res) => {
      res.setHeader('Cache-Control', 'no-cache');
      res.sendFile(join(dir, 'index.html'));
    });
  }
  app.use(errorHandler(deps.logger));
  return app;
}
