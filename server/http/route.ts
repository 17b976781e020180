import type { Request, Response } from 'express';
import type { z } from 'zod';
import type { Role } from '../../shared/common';
import type { Deps } from '../deps';
import type { SessionUser } from './session';

/**
 * Who may call a route. `public`: anyone. `signed-in`: any signed-in user. A role list: only those.
 * `integration`: a site's integration token (Bearer), no cookie session.
 * Routes with `:siteId` in the path also require the caller to belong to that site (admins: any).
 */
export type Access = 'public' | 'signed-in' | 'integration' | readonly Role[];

export type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

export interface RouteContext<B, Q> {
  req: Request;
  res: Response;
  deps: Deps;
  /** Null only on public routes. */
  user: SessionUser | null;
  body: B;
  query: Q;
  params: Record<string, string>;
  /** The path's `:siteId`, already checked against the caller's sites. */
  siteId: number | null;
  /** Integration token's site, on `integration` routes. */
  tokenSiteId: number | null;
}

export interface RouteDef<B = unknown, Q = unknown> {
  method: Method;
  /** Express path, e.g. `/api/sites/:siteId/floor-plans`. */
  path: string;
  access: Access;
  summary: string;
  body?: z.ZodType<B>;
  query?: z.ZodType<Q>;
  /** For the published API description. */
  response?: z.ZodType;
  /**
   * Request bodies that are not JSON (uploads): the route parses them itself (multer) before the
   * handler; `body` is then ignored.
   */
  upload?: 'single-file';
  /** Returns the JSON answer; or writes to `res` itself (files, SSE) and returns undefined. */
  // Method syntax on purpose: routes with different body types then fit one table (bivariant parameter).
  handler(ctx: RouteContext<B, Q>): unknown;
  /** HTTP status for a JSON answer; default 200. */
  status?: number;
}

/** Keeps B and Q inferred from the schemas at each definition. */
export function defineRoute<B = undefined, Q = undefined>(def: RouteDef<B, Q>): RouteDef<B, Q> {
  return def;
}

/** A route with its body and query types erased, as the route table holds them. */
export type AnyRoute = RouteDef<unknown, unknown>;
