import { z } from 'zod';
import { Ok } from '../../shared/common';
import { CreatePickerBody, InviteBody, InviteRow, ResetPinBody, SessionsEnded, UpdateUserBody, UserRow } from '../../shared/users';
import { pathId } from '../http/path-id';
import { defineRoute } from '../http/route';
import { createPicker, endSessionsOf, inviteUser, listInvites, resetPin, updateUserAsAdmin } from './users.service';
import { listUsers } from './users.repository';

export const userRoutes = [
  defineRoute({
    method: 'get',
    path: '/api/users',
    access: ['admin'],
    summary: 'All users',
    response: z.array(UserRow),
    handler: ({ deps }) => listUsers(deps.db),
  }),
  defineRoute({
    method: 'get',
    path: '/api/users/invites',
    access: ['admin'],
    summary: 'Invitations sent',
    response: z.array(InviteRow),
    handler: ({ deps }) => listInvites(deps.db),
  }),
  defineRoute({
    method: 'post',
    path: '/api/users/invites',
    access: ['admin'],
    summary: 'Invite a user by e-mail (single-use link, 72 h)',
    status: 201,
    body: InviteBody,
    response: InviteRow,
    handler: ({ deps, body, user }) => inviteUser(deps, user.id, body),
  }),
  defineRoute({
    method: 'post',
    path: '/api/users/pickers',
    access: ['admin'],
    summary: 'Create a picker with badge code and PIN',
    status: 201,
    body: CreatePickerBody,
    response: UserRow,
    handler: ({ deps, body, user }) => createPicker(deps, user.id, body),
  }),
  defineRoute({
    method: 'patch',
    path: '/api/users/:id',
    access: ['admin'],
    summary: 'Change role, sites, name; deactivate or reactivate',
    body: UpdateUserBody,
    response: UserRow,
    handler: ({ deps, body, user, params }) => updateUserAsAdmin(deps, user.id, pathId(params.id, 'User'), body),
  }),
  defineRoute({
    method: 'post',
    path: '/api/users/:id/pin',
    access: ['admin'],
    summary: "Reset a picker's PIN",
    body: ResetPinBody,
    response: Ok,
    handler: async ({ deps, body, user, params }) => {
      await resetPin(deps, user.id, pathId(params.id, 'User'), body.pin);
      return { ok: true as const };
    },
  }),
  defineRoute({
    method: 'post',
    path: '/api/users/:id/end-sessions',
    access: ['admin'],
    summary: "End all of a user's sessions on every device (they sign in again)",
    response: SessionsEnded,
    handler: ({ deps, user, params }) => endSessionsOf(deps, user.id, pathId(params.id, 'User')),
  }),
];
