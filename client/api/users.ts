import { Ok } from '@shared/common';
import { InviteRow, SessionsEnded, UserRow, type CreatePickerBody, type InviteBody, type UpdateUserBody } from '@shared/users';
import { http } from './http';

export const listUsers = () => http('GET', '/api/users', UserRow.array());
export const listInvites = () => http('GET', '/api/users/invites', InviteRow.array());
export const inviteUser = (body: InviteBody) => http('POST', '/api/users/invites', InviteRow, { body });
export const createPicker = (body: CreatePickerBody) => http('POST', '/api/users/pickers', UserRow, { body });
export const updateUser = (id: number, body: UpdateUserBody) => http('PATCH', `/api/users/${id}`, UserRow, { body });
export const resetPin = (id: number, pin: string) => http('POST', `/api/users/${id}/pin`, Ok, { body: { pin } });
export const endSessions = (id: number) => http('POST', `/api/users/${id}/end-sessions`, SessionsEnded);
