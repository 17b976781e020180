import type { Request, Response } from 'express';
import { z } from 'zod';
import { BadgeSignInBody, ChangePasswordBody, InviteAcceptBody, InviteInfo, Me, ResetCompleteBody, ResetRequestBody, SignInBody } from '../../shared/auth';
import { Ok } from '../../shared/common';
import { audit } from '../audit/audit';
import { AppError } from '../http/errors';
import { defineRoute } from '../http/route';
import { parseOr400 } from '../http/validate';
import { clearSession, issueSession } from '../http/session';
import type { Deps } from '../deps';
import { findUserById, type DbUserRow } from '../users/users.repository';
import {
  acceptInvite, changePassword, completePasswordReset, inviteInfo, meOf, requestPasswordReset, signInWithBadge, signInWithPassword,
} from './auth.service';

const nowS = () => Math.floor(Date.now() / 1000);
const deviceOf = (ua: string | undefined) => (ua ?? '').slice(0, 200) || null;

/** A fresh session for a user who just proved who they are: cookie, audit entry, and who they are. */
async function startSession(ctx: { deps: Deps; res: Response; req: Request }, user: DbUserRow, action: string): Promise<Me> {
  const t = nowS();
  issueSession(ctx.deps, ctx.res, user.id, user.token_version, t);
  await audit(ctx.deps.db, { userId: user.id, action, device: deviceOf(ctx.req.get('user-agent')) });
  return meOf(ctx.deps.db, user, t);
}

export const authRoutes = [
  defineRoute({
    method: 'post', path: '/api/auth/sign-in', access: 'public', summary: 'Sign in with e-mail and password',
    body: SignInBody, response: Me,
    handler: async (ctx) => startSession(ctx, await signInWithPassword(ctx.deps, ctx.body.email, ctx.body.password), 'sign-in'),
  }),
  defineRoute({
    method: 'post', path: '/api/auth/badge-sign-in', access: 'public', summary: 'Sign in on a shared tablet with badge code and PIN',
    body: BadgeSignInBody, response: Me,
    handler: async (ctx) => startSession(ctx, await signInWithBadge(ctx.deps, ctx.body.badge, ctx.body.pin), 'badge-sign-in'),
  }),
  defineRoute({
    method: 'post', path: '/api/auth/sign-out', access: 'public', summary: 'Sign out (clears the session cookie)',
    response: Ok,
    handler: ({ deps, res }) => {
      clearSession(deps, res);
      return { ok: true as const };
    },
  }),
  defineRoute({
    method: 'get', path: '/api/auth/me', access: 'signed-in', summary: 'Who is signed in',
    response: Me,
    handler: async ({ deps, user }) => {
      const row = await findUserById(deps.db, user!.id);
      if (!row) throw new AppError('unauthenticated', 'unauthenticated', 'Please sign in');
      return meOf(deps.db, row, user!.authTime);
    },
  }),
  defineRoute({
    method: 'post', path: '/api/auth/password', access: ['admin', 'supervisor', 'engineer'], summary: 'Change your own password',
    body: ChangePasswordBody, response: Ok,
    handler: async ({ deps, body, user, res }) => {
      await changePassword(deps, user!.id, body.currentPassword, body.newPassword);
      // The token version moved on: give this device a fresh session so only other devices sign out.
      const row = (await findUserById(deps.db, user!.id))!;
      issueSession(deps, res, row.id, row.token_version, user!.authTime);
      return { ok: true as const };
    },
  }),
  defineRoute({
    method: 'post', path: '/api/auth/reset-request', access: 'public', summary: 'Mail a password-reset link (always answers ok)',
    body: ResetRequestBody, response: Ok,
    handler: async ({ deps, body }) => {
      await requestPasswordReset(deps, body.email);
      return { ok: true as const };
    },
  }),
  defineRoute({
    method: 'post', path: '/api/auth/reset', access: 'public', summary: 'Set a new password with a reset link',
    body: ResetCompleteBody, response: Ok,
    handler: async ({ deps, body }) => {
      await completePasswordReset(deps, body.token, body.newPassword);
      return { ok: true as const };
    },
  }),
  defineRoute({
    method: 'get', path: '/api/auth/invites/:token', access: 'public', summary: 'What an invitation is for',
    response: InviteInfo,
    handler: ({ deps, params }) => inviteInfo(deps.db, parseOr400(z.string().max(200), params.token, 'invitation link')),
  }),
  defineRoute({
    method: 'post', path: '/api/auth/invites/accept', access: 'public', summary: 'Accept an invitation: choose a name and password',
    body: InviteAcceptBody, response: Me, status: 201,
    handler: async (ctx) => startSession(ctx, await acceptInvite(ctx.deps, ctx.body.token, ctx.body.name, ctx.body.password), 'sign-in'),
  }),
];
