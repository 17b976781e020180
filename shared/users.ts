import { z } from 'zod';
import { Role } from './common';
import { BadgeCode, Email, Pin } from './auth';

export const UserRow = z.object({
  id: z.number().int(),
  name: z.string(),
  email: z.string().nullable(),
  role: Role,
  badge: z.string().nullable(),
  active: z.boolean(),
  siteIds: z.array(z.number().int()),
  createdAt: z.string(),
});
export type UserRow = z.infer<typeof UserRow>;

export const InviteBody = z.strictObject({
  email: Email,
  role: z.enum(['admin', 'supervisor', 'engineer']),
  siteIds: z.array(z.number().int().positive()).min(1),
});
export type InviteBody = z.infer<typeof InviteBody>;

export const InviteRow = z.object({
  id: z.number().int(),
  email: z.string(),
  role: Role,
  expiresAt: z.string(),
  acceptedAt: z.string().nullable(),
  createdAt: z.string(),
});
export type InviteRow = z.infer<typeof InviteRow>;

/** Pickers have no mailbox on the floor: an admin creates them with a badge code and a PIN. */
export const CreatePickerBody = z.strictObject({
  name: z.string().trim().min(1).max(120),
  badge: BadgeCode,
  pin: Pin,
  siteIds: z.array(z.number().int().positive()).min(1),
});
export type CreatePickerBody = z.infer<typeof CreatePickerBody>;

export const UpdateUserBody = z.strictObject({
  role: Role.optional(),
  active: z.boolean().optional(),
  siteIds: z.array(z.number().int().positive()).min(1).optional(),
  name: z.string().trim().min(1).max(120).optional(),
});
export type UpdateUserBody = z.infer<typeof UpdateUserBody>;

export const ResetPinBody = z.strictObject({ pin: Pin });

/** How many live sessions a sign-out everywhere or an admin's "end sessions" ended. */
export const SessionsEnded = z.object({ ended: z.number().int() });
export type SessionsEnded = z.infer<typeof SessionsEnded>;
