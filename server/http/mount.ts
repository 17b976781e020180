import type { Express, NextFunction, Request, Response } from 'express';
import multer from 'multer';
import { CSRF_HEADER, CSRF_VALUE } from '../../shared/common';
import type { Deps } from '../deps';
import { loadLiveSession } from '../auth/sessions.repository';
import { findActiveToken } from '../integrations/tokens.repository';
import { AppError } from './errors';
import type { AnyRoute } from './route';
import { issueSession, readSession, shouldRenew, type SessionUser } from './session';
import { pathId } from './path-id';
import { parseOr400 } from './validate';

const UNSAFE = new Set(['post', 'put', 'patch', 'delete']);

/** Uploads: one file, 25 MiB, few fields (multer's limits default to Infinity). */
export const UPLOAD_MAX_BYTES = 25 * 1024 * 1024;
const upload = multer({
  storage: multer.memoryStorage(),
  limits: { fileSize: UPLOAD_MAX_BYTES, files: 1, fields: 10, fieldSize: 64 * 1024, parts: 12 },
}).single('file');

/**
 * CSRF: unsafe methods need our custom header (a cross-site form cannot send one) and, when the
 * browser says where the request came from, the same origin.
 */
function checkCsrf(req: Request): void {
  if (req.get(CSRF_HEADER) !== CSRF_VALUE) {
    throw new AppError('forbidden', 'csrf_failed', `Missing ${CSRF_HEADER} header on a state-changing request`);
  }
  const site = req.get('sec-fetch-site');
  if (site && site !== 'same-origin' && site !== 'none') {
    throw new AppError('forbidden', 'csrf_failed', 'Cross-site request refused');
  }
  const origin = req.get('origin');
  if (origin) {
    const host = req.get('host');
    let originHost: string | null = null;
    try {
      originHost = new URL(origin).host;
    } catch {
      originHost = null;
    }
    if (!host || originHost !== host) throw new AppError('forbidden', 'csrf_failed', 'Cross-origin request refused');
  }
}

async function authenticate(deps: Deps, req: Request, res: Response): Promise<SessionUser | null> {
  const claims = readSession(deps, req);
  if (!claims) return null;
  // Signed out (here or on another instance), ended by an admin, or the user deactivated: refused, never renewed.
  const user = await loadLiveSession(deps.db, claims.sid, Number(claims.sub));
  // Role and password changes raise token_version: older tokens stop at once.
  if (!user || user.tokenVersion !== claims.ver) return null;
  if (shouldRenew(claims.exp)) issueSession(deps, res, user.id, user.tokenVersion, claims.auth, claims.sid);
  return { id: user.id, role: user.role, name: user.name, siteIds: user.siteIds, authTime: claims.auth, sessionId: claims.sid };
}

function runMulter(req: Request, res: Response): Promise<void> {
  return new Promise((resolve, reject) => {
    upload(req, res, (err: unknown) => {
      if (!err) return resolve();
      if (err instanceof multer.MulterError) {
        const tooLarge = err.code === 'LIMIT_FILE_SIZE';
        return reject(
          new AppError(
            tooLarge ? 'too_large' : 'validation',
            tooLarge ? 'file_too_large' : 'bad_upload',
            tooLarge ? `File is larger than ${UPLOAD_MAX_BYTES / 1024 / 1024} MiB` : `Upload refused: ${err.message} (send one file in the field "file")`,
          ),
        );
      }
      reject(err as Error);
    });
  });
}

/** Mounts every route of the table; the table is the only way routes reach the app. */
export function mountRoutes(app: Express, routes: readonly AnyRoute[], deps: Deps): void {
  for (const route of routes) {
    app[route.method](route.path, async (req: Request, res: Response, _next: NextFunction) => {
      let user: SessionUser | null = null;
      let tokenSiteId: number | null = null;
      if (route.access === 'integration') {
        const header = req.get('authorization') ?? '';
        const m = /^Bearer\s+(\S+)$/i.exec(header);
        const token = m ? await findActiveToken(deps.db, m[1]!) : null;
        if (!token) throw new AppError('unauthenticated', 'integration_token_required', 'A valid integration token is required (Authorization: Bearer …)');
        tokenSiteId = token.siteId;
      } else {
        if (UNSAFE.has(route.method)) checkCsrf(req);
        if (route.access !== 'public') {
          user = await authenticate(deps, req, res);
          if (!user) throw new AppError('unauthenticated', 'unauthenticated', 'Please sign in');
          if (route.access !== 'signed-in' && !route.access.includes(user.role)) {
            throw new AppError('forbidden', 'forbidden', 'Your role may not do this');
          }
        }
      }

      const params = { ...(req.params as Record<string, string>) };
      let siteId: number | null = null;
      if (params.siteId !== undefined) {
        siteId = pathId(params.siteId, 'Site');
        if (tokenSiteId !== null && tokenSiteId !== siteId) throw new AppError('forbidden', 'wrong_site', 'This token belongs to another site');
        if (user && user.role !== 'admin' && !user.siteIds.includes(siteId)) {
          throw new AppError('forbidden', 'not_site_member', 'You do not belong to this site');
        }
      }

      if (route.upload) await runMulter(req, res);
      const body = route.body && !route.upload ? parseOr400(route.body, req.body ?? {}, 'request body') : undefined;
      // Express 5's req.query is read-only: validate into a new object.
      const query = route.query ? parseOr400(route.query, { ...(req.query as object) }, 'query') : undefined;

      const result = await route.handler({ req, res, deps, user, body, query, params, siteId, tokenSiteId });
      if (result === undefined) {
        if (!res.headersSent) res.status(204).end();
        return;
      }
      res.status(route.status ?? 200).json(result);
    });
  }
}
