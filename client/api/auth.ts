import type { z } from 'zod';
import { Ok } from '@shared/common';
import {
  InviteInfo,
  Me,
  type BadgeSignInBody,
  type ChangePasswordBody,
  type InviteAcceptBody,
  type ResetCompleteBody,
  type ResetRequestBody,
  type SignInBody,
} from '@shared/auth';
import { SessionsEnded } from '@shared/users';
import { http } from './http';

export const getMe = () => http('GET', '/api/auth/me', Me, { quietUnauthenticated: true });
export const signIn = (body: SignInBody) => http('POST', '/api/auth/sign-in', Me, { body });
export const badgeSignIn = (body: BadgeSignInBody) => http('POST', '/api/auth/badge-sign-in', Me, { body });
export const signOut = () => http('POST', '/api/auth/sign-out', Ok, { quietUnauthenticated: true });
export const signOutEverywhere = () => http('POST', '/api/auth/sign-out-everywhere', SessionsEnded, { quietUnauthenticated: true });
export const changePassword = (body: z.input<typeof ChangePasswordBody>) => http('POST', '/api/auth/password', Ok, { body });
export const requestReset = (body: z.input<typeof ResetRequestBody>) => http('POST', '/api/auth/reset-request', Ok, { body });
export const completeReset = (body: z.input<typeof ResetCompleteBody>) => http('POST', '/api/auth/reset', Ok, { body });
export const getInvite = (token: string) => http('GET', `/api/auth/invites/${encodeURIComponent(token)}`, InviteInfo, { quietUnauthenticated: true });
export const acceptInvite = (body: z.input<typeof InviteAcceptBody>) => http('POST', '/api/auth/invites/accept', Me, { body });
