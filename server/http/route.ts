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

/** The names of a path's `:params`, e.g. `'siteId' | 'id'` for `/api/sites/:siteId/orders/:id`. */
export type PathParamNames<P extends string> = P extends `${string}:${infer Rest}`
  ? Rest extends `${infer Name}/${infer Tail}`
    ? Name | PathParamNames<`/${Tail}`>
    : Rest
  : never;

/** `params` typed from the path; any string path (the route table) gives a plain record. */
export type PathParams<P extends string> = string extends P ? Record<string, string> : Record<PathParamNames<P>, string>;

/** The caller as the access rule guarantees it: signed in on every rule but `public` and `integration`. */
export type UserFor<A extends Access> = A extends 'public' | 'integration' ? null : SessionUser;

/** `siteId` is a number when the path has `:siteId` (checked by the mount), null when it has none. */
export type SiteIdFor<P extends string> = string extends P ? number | null : 'siteId' extends PathParamNames<P> ? number : null;

export interface RouteContext<B, Q, P extends string = string, A extends Access = Access> {
  req: Request;
  res: Response;
  deps: Deps;
  /** The signed-in caller; null on public and integration routes. */
  user: UserFor<A>;
  body: B;
  query: Q;
  /** The path's raw parameters; read ids through `pathId`. */
  params: PathParams<P>;
  /** The path's `:siteId`, already checked against the caller's sites. */
  siteId: SiteIdFor<P>;
  /** Integration token's site, on `integration` routes. */
  tokenSiteId: number | null;
}

export interface RouteDef<B = unknown, Q = unknown, P extends string = string, A extends Access = Access> {
  method: Method;
  /** Express path, e.g. `/api/sites/:siteId/floor-plans`. */
  path: P;
  access: A;
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
  handler(ctx: RouteContext<B, Q, P, A>): unknown;
  /** HTTP status for a JSON answer; default 200. */
  status?: number;
}

/**
 * Keeps B and Q inferred from the schemas at each definition, and the path and access rule as
 * literals, so the handler sees `user` non-null and `siteId` a number where the rule and path say so.
 */
export function defineRoute<B = undefined, Q = undefined, const P extends string = string, const A extends Access = Access>(
  def: RouteDef<B, Q, P, A>,
): RouteDef<B, Q, P, A> {
  return def;
}

/** The office roles: they read plans, orders, waves and trips (pickers use the tablet's routes). */
export const OFFICE_ROLES: readonly Role[] = ['supervisor', 'admin', 'engineer'];

/**
 * `defineRoute` with the method and access rule fixed, for a run of routes that share them; the path,
 * body and query still type each handler's context.
 */
export function routesWith<const A extends Access>(method: Method, access: A) {
  return <B = undefined, Q = undefined, const P extends string = string>(def: Omit<RouteDef<B, Q, P, A>, 'method' | 'access'>): RouteDef<B, Q, P, A> =>
    defineRoute<B, Q, P, A>({ ...def, method, access });
}

/** A GET for the office roles. */
export const officeRead = routesWith('get', OFFICE_ROLES);

/** A route with its body and query types erased, as the route table holds them. */
export type AnyRoute = RouteDef<unknown, unknown>;
