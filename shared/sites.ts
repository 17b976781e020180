import { z } from 'zod';
import { TimeZoneName } from './time-zone';

export const CartProfile = z.object({
  id: z.number().int(),
  name: z.string(),
  totes: z.number().int().positive(),
  maxKg: z.number().positive(),
  maxLitres: z.number().positive(),
});
export type CartProfile = z.infer<typeof CartProfile>;

export const CartProfileBody = z.strictObject({
  name: z.string().trim().min(1).max(80),
  totes: z.number().int().min(1).max(100),
  maxKg: z.number().positive().max(5000),
  maxLitres: z.number().positive().max(50000),
});
export type CartProfileBody = z.infer<typeof CartProfileBody>;

export const SiteSettings = z.object({
  /** m/s. Default 1.0: common in order-picking studies; comfortable adult pace 1.27–1.46 m/s (Bohannon 1997). */
  walkingSpeedMps: z.number().positive().max(3),
  /** s per pick line. Default 10 (common practice, from memory). */
  secondsPerLine: z.number().min(0).max(600),
  /** s per stop (stopping, reading the bin label). Default 5 (common practice, from memory). */
  secondsPerStop: z.number().min(0).max(600),
  /** What a picker scans to confirm a line. */
  confirmScan: z.enum(['bin', 'sku']),
});
export type SiteSettings = z.infer<typeof SiteSettings>;

/** Where each default comes from, shown beside the field in the UI. */
export const SETTING_SOURCES: Record<keyof SiteSettings, string> = {
  walkingSpeedMps: 'Default 1.0 m/s, common in order-picking studies; comfortable adult pace is 1.27–1.46 m/s (Bohannon 1997).',
  secondsPerLine: 'Default 10 s per line: common practice; time a few lines on your floor and adjust.',
  secondsPerStop: 'Default 5 s per stop (stopping, reading the bin label): common practice; adjust to your floor.',
  confirmScan: 'Default: scan the bin label.',
};

export const DEFAULT_SETTINGS: SiteSettings = { walkingSpeedMps: 1.0, secondsPerLine: 10, secondsPerStop: 5, confirmScan: 'bin' };

export const Site = z.object({
  id: z.number().int(),
  code: z.string(),
  name: z.string(),
  timezone: z.string(),
  settings: SiteSettings,
  cartProfiles: z.array(CartProfile),
});
export type Site = z.infer<typeof Site>;

export const CreateSiteBody = z.strictObject({
  code: z
    .string()
    .trim()
    .regex(/^[A-Z0-9-]{2,16}$/, '2–16 capital letters, digits or dashes'),
  name: z.string().trim().min(1).max(120),
  timezone: TimeZoneName.default('UTC'),
});
export const UpdateSiteBody = z.strictObject({
  name: z.string().trim().min(1).max(120).optional(),
  timezone: TimeZoneName.optional(),
  settings: SiteSettings.partial().strict().optional(),
});

export const OutboxMessage = z.object({
  id: z.number().int(),
  to: z.string(),
  subject: z.string(),
  text: z.string(),
  html: z.string().nullable(),
  attachments: z.array(z.object({ filename: z.string(), contentType: z.string(), bytes: z.number().int() })),
  /** `retrying`: a send failed and the next try is due at `nextAttemptAt`; `failed`: the last try failed. */
  status: z.enum(['stored', 'sent', 'retrying', 'failed']),
  error: z.string().nullable(),
  createdAt: z.string(),
  /** A mail with a single-use link: live, or used / expired (the link is then removed from the text). */
  linkState: z.enum(['live', 'used', 'expired']).nullable(),
  attempts: z.number().int(),
  nextAttemptAt: z.string().nullable(),
  /** Set when retention removed the body and attachments. */
  prunedAt: z.string().nullable(),
});
export type OutboxMessage = z.infer<typeof OutboxMessage>;

export const IntegrationToken = z.object({
  id: z.number().int(),
  name: z.string(),
  prefix: z.string(),
  createdAt: z.string(),
  revokedAt: z.string().nullable(),
  lastUsedAt: z.string().nullable(),
  /** Null: never expires. */
  expiresAt: z.string().nullable(),
  /** Name of the admin who created it (null when that user is gone). */
  createdBy: z.string().nullable(),
});
export type IntegrationToken = z.infer<typeof IntegrationToken>;
/** Returned once, at creation: the secret itself is never stored. */
export const NewIntegrationToken = IntegrationToken.extend({ token: z.string() });
export const CreateIntegrationTokenBody = z.strictObject({
  name: z.string().trim().min(1).max(80),
  /** Optional expiry (ISO time, in the future); refused from then on. */
  expiresAt: z.iso
    .datetime({ offset: true })
    .refine((v) => new Date(v).getTime() > Date.now(), 'must be in the future')
    .optional(),
});
