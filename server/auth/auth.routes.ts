import type { Request, Response } from 'express';
import { z } from 'zod';
import { BadgeSignInBody, ChangePasswordBody, InviteAcceptBody, InviteInfo, Me, ResetCompleteBody, ResetRequestBody, SignInBody } from '../../shared/auth';
import { Ok } from '../../shared/common';
import { SessionsEnded } from '../../shared/users';
import { audit } from '../audit/audit';
import { AppError } from '../http/errors';
import { defineRoute } from '../http/route';
import { parseOr400 } from '../http/validate';
import { clearSession, issueSession, readSession } from '../http/session';
import { createSession, revokeAllSessions, revokeSession } from './sessions.repository';
import type { Deps } from '../deps';
import { findUserById, type DbUserRow } from '../users/users.repository';
import {
  acceptInvite,
  changePassword,
  completePasswordReset,
  inviteInfo,
  meOf,
  requestPasswordReset,
  signInWithBadge,
  signInWithPassword,
} from './auth.service';

const nowS = () => Math.floor(Date.now() / 1000);
const deviceOf = (ua: string | undefined) => (ua ?? '').slice(0, 200) || null;
/** The caller's address as Express sees it (behind a proxy only with TRUST_PROXY). */
const addressOf = (req: Request) => req.ip ?? req.socket.remoteAddress ?? 'unknown';

/** A fresh session for a user who just proved who they are: cookie, audit entry, and who they are. */
async function startSession(ctx: { deps: Deps; res: Response; req: Request }, user: DbUserRow, action: string): Promise<Me> {
  const t = nowS();
  const device = deviceOf(ctx.req.get('user-agent'));
  const sessionId = await createSession(ctx.deps.db, user.id, t, device);
  issueSession(ctx.deps, ctx.res, user.id, user.token_version, t, sessionId);
  await audit(ctx.deps.db, { userId: user.id, action, device });
  return meOf(ctx.deps.db, user, t);
}

export const authRoutes = [
  defineRoute({
    method: 'post',
    path: '/api/auth/sign-in',
    access: 'public',
    summary: 'Sign in with e-mail and password',
    body: SignInBody,
    response: Me,
    handler: async (ctx) => startSession(ctx, await signInWithPassword(ctx.deps, ctx.body.email, ctx.body.password, addressOf(ctx.req)), 'sign-in'),
  }),
  defineRoute({
    method: 'post',
    path: '/api/auth/badge-sign-in',
    access: 'public',
    summary: 'Sign in on a shared tablet with badge code and PIN',
    body: BadgeSignInBody,
    response: Me,
    handler: async (ctx) => startSession(ctx, await signInWithBadge(ctx.deps, ctx.body.badge, ctx.body.pin, addressOf(ctx.req)), 'badge-sign-in'),
  }),
  defineRoute({
    method: 'post',
    path: '/api/auth/sign-out',
    access: 'public',
    summary: 'Sign out: ends this session on the server and clears its cookie',
    response: Ok,
    handler: async ({ deps, req, res }) => {
      const claims = readSession(deps, req);
      if (claims && (await revokeSession(deps.db, claims.sid)) > 0) {
        await audit(deps.db, { userId: Number(claims.sub), action: 'sign-out', device: deviceOf(req.get('user-agent')) });
      }
      clearSession(deps, res);
      return { ok: true as const };
    },
  }),
  defineRoute({
    method: 'post',
    path: '/api/auth/sign-out-everywhere',
    access: 'signed-in',
    summary: 'Sign out on every device: ends all your sessions, this one included',
    response: SessionsEnded,
    handler: async ({ deps, req, res, user }) => {
      const ended = await revokeAllSessions(deps.db, user.id);
      await audit(deps.db, { userId: user.id, action: 'sign-out.everywhere', detail: { ended }, device: deviceOf(req.get('user-agent')) });
      clearSession(deps, res);
      return { ended };
    },
  }),
  defineRoute({
    method: 'get',
    path: '/api/auth/me',
    access: 'signed-in',
    summary: 'Who is signed in',
    response: Me,
    handler: async ({ deps, user }) => {
      const row = await findUserById(deps.db, user.id);
      if (!row) throw new AppError('unauthenticated', 'unauthenticated', 'Please sign in');
      return meOf(deps.db, row, user.authTime);
    },
  }),
  defineRoute({
    method: 'post',
    path: '/api/auth/password',
    access: ['admin', 'supervisor', 'engineer'],
    summary: 'Change your own password',
    body: ChangePasswordBody,
    response: Ok,
    handler: async ({ deps, body, user, res }) => {
      await changePassword(deps, user.id, body.currentPassword, body.newPassword);
      // The token version moved on: give this device a fresh session so only other devices sign out.
      const row = (await findUserById(deps.db, user.id))!;
      issueSession(deps, res, row.id, row.token_version, user.authTime, user.sessionId);
      return { ok: true as const };
    },
  }),
  defineRoute({
    method: 'post',
    path: '/api/auth/reset-request',
    access: 'public',
    summary: 'Mail a password-reset link (always answers ok)',
    body: ResetRequestBody,
    response: Ok,
    handler: async ({ deps, body }) => {
      await requestPasswordReset(deps, body.email);
      return { ok: true as const };
    },
  }),
  defineRoute({
    method: 'post',
    path: '/api/auth/reset',
    access: 'public',
    summary: 'Set a new password with a reset link',
    body: ResetCompleteBody,
    response: Ok,
    handler: async ({ deps, body }) => {
      await completePasswordReset(deps, body.token, body.newPassword);
      return { ok: true as const };
    },
  }),
  defineRoute({
    method: 'get',
    path: '/api/auth/invites/:token',
    access: 'public',
    summary: 'What an invitation is for',
    response: InviteInfo,
    handler: ({ deps, params }) => inviteInfo(deps.db, parseOr400(z.string().max(200), params.token, 'invitation link')),
  }),
  defineRoute({
    method: 'post',
    path: '/api/auth/invites/accept',
    access: 'public',
    summary: 'Accept an invitation: choose a name and password',
    body: InviteAcceptBody,
    response: Me,
    status: 201,
    handler: async (ctx) => startSession(ctx, await acceptInvite(ctx.deps, ctx.body.token, ctx.body.name, ctx.body.password), 'sign-in'),
  }),
];
