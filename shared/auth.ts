import { z } from 'zod';
import { Role } from './common';

export const PASSWORD_MIN = 10;
export const PIN_MIN = 6;

export const Password = z.string().min(PASSWORD_MIN, `at least ${PASSWORD_MIN} characters`).max(200);
export const Pin = z.string().regex(/^\d{6,12}$/, `${PIN_MIN} to 12 digits`);
export const Email = z.string().trim().toLowerCase().email().max(200);

export const SignInBody = z.strictObject({ email: Email, password: z.string().min(1).max(200) });
export type SignInBody = z.infer<typeof SignInBody>;

/** Badge codes are compared like scans: case and surrounding spaces never matter (stored upper-case). */
export const normaliseBadge = (badge: string): string => badge.trim().toUpperCase();
export const BadgeCode = z.string().trim().toUpperCase().min(1).max(64);

export const BadgeSignInBody = z.strictObject({ badge: BadgeCode, pin: z.string().min(1).max(12) });
export type BadgeSignInBody = z.infer<typeof BadgeSignInBody>;

export const SiteRef = z.object({ id: z.number().int(), code: z.string(), name: z.string(), /** IANA time zone of the site, for due times and clocks (e.g. "Europe/Berlin"). */ timezone: z.string().optional() });
export type SiteRef = z.infer<typeof SiteRef>;

/** Who is signed in, as `GET /api/auth/me` and every sign-in answer return it. */
export const Me = z.object({
  id: z.number().int(),
  name: z.string(),
  email: z.string().nullable(),
  role: Role,
  badge: z.string().nullable(),
  sites: z.array(SiteRef),
  /** Absolute end of this session (ISO 8601): a shift's length after sign-in. */
  sessionEndsAt: z.string(),
});
export type Me = z.infer<typeof Me>;

export const ChangePasswordBody = z.strictObject({ currentPassword: z.string().min(1).max(200), newPassword: Password });
export const ResetRequestBody = z.strictObject({ email: Email });
export const ResetCompleteBody = z.strictObject({ token: z.string().min(20).max(200), newPassword: Password });
export const InviteAcceptBody = z.strictObject({
  token: z.string().min(20).max(200),
  name: z.string().trim().min(1).max(120),
  password: Password,
});
export const InviteInfo = z.object({ email: z.string(), role: Role, expiresAt: z.string() });
export type InviteInfo = z.infer<typeof InviteInfo>;
