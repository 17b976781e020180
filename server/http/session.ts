import { createSecretKey, type KeyObject } from 'node:crypto';
import jwt from 'jsonwebtoken';
import type { Request, Response } from 'express';
import type { Role } from '../../shared/common';
import type { Deps } from '../deps';

export const SESSION_COOKIE = 'aw_session';
const ISSUER = 'aislewright';
const AUDIENCE = 'aislewright-app';
/** Idle limit: the token lives 15 minutes and is renewed while the user is active. */
export const TOKEN_TTL_S = 15 * 60;
/** Renew when less than this remains, so an active user never drops out. */
const RENEW_BELOW_S = 10 * 60;
/** Absolute limit: one shift. */
export const SESSION_MAX_S = 10 * 60 * 60;

/**
 * The secret as a KeyObject, made once: given a string, jsonwebtoken first tries to read it as a
 * public key on every call, about 1 ms of CPU per request measured under the picking load test.
 */
const keys = new Map<string, KeyObject>();
function keyOf(secret: string): KeyObject {
  let k = keys.get(secret);
  if (!k) {
    k = createSecretKey(Buffer.from(secret, 'utf8'));
    keys.set(secret, k);
  }
  return k;
}

export interface SessionClaims {
  sub: string;
  /** users.token_version when issued. */
  ver: number;
  /** Sign-in time, seconds since epoch; the absolute limit counts from here. */
  auth: number;
  /** Server-side session id (table `sessions`): sign-out revokes it on every instance. */
  sid: string;
}

export interface SessionUser {
  id: number;
  role: Role;
  name: string;
  siteIds: number[];
  authTime: number;
  sessionId: string;
}

export function issueSession(deps: Deps, res: Response, userId: number, tokenVersion: number, authTime: number, sessionId: string): void {
  const token = jwt.sign({ ver: tokenVersion, auth: authTime, sid: sessionId } satisfies Omit<SessionClaims, 'sub'>, keyOf(deps.jwtSecret), {
    algorithm: 'HS256',
    subject: String(userId),
    issuer: ISSUER,
    audience: AUDIENCE,
    expiresIn: TOKEN_TTL_S,
  });
  res.cookie(SESSION_COOKIE, token, {
    httpOnly: true,
    sameSite: 'strict',
    secure: deps.config.COOKIE_SECURE,
    path: '/',
    maxAge: TOKEN_TTL_S * 1000,
  });
}

export function clearSession(deps: Deps, res: Response): void {
  res.clearCookie(SESSION_COOKIE, { httpOnly: true, sameSite: 'strict', secure: deps.config.COOKIE_SECURE, path: '/' });
}

/** Verified claims, or null for a missing, forged, expired or over-age token. */
export function readSession(deps: Deps, req: Request): (SessionClaims & { exp: number }) | null {
  const token: unknown = req.cookies?.[SESSION_COOKIE];
  if (typeof token !== 'string' || token.length === 0) return null;
  try {
    const claims = jwt.verify(token, keyOf(deps.jwtSecret), { algorithms: ['HS256'], issuer: ISSUER, audience: AUDIENCE }) as jwt.JwtPayload;
    if (typeof claims.sub !== 'string' || typeof claims.ver !== 'number' || typeof claims.auth !== 'number' || typeof claims.exp !== 'number') return null;
    // Tokens from before server-side sessions carry no sid: they no longer count.
    if (typeof claims.sid !== 'string' || claims.sid.length === 0 || claims.sid.length > 64) return null;
    if (Date.now() / 1000 - claims.auth > SESSION_MAX_S) return null;
    return { sub: claims.sub, ver: claims.ver, auth: claims.auth, sid: claims.sid, exp: claims.exp };
  } catch {
    return null;
  }
}

export function shouldRenew(exp: number): boolean {
  return exp - Date.now() / 1000 < RENEW_BELOW_S;
}
