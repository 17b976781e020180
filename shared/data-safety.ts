/** Backups, retention, the audit log and exports: the admin's data-safety screens. */
import { z } from 'zod';

export const BackupItem = z.object({
  name: z.string(),
  createdAt: z.string(),
  bytes: z.number().int(),
  /** Copy time, ms; null when unknown (no manifest). */
  ms: z.number().nullable(),
  /** Integrity check result; null when never checked. */
  verified: z.boolean().nullable(),
  problems: z.array(z.string()),
  trigger: z.enum(['schedule', 'admin', 'cli']).nullable(),
});
export type BackupItem = z.infer<typeof BackupItem>;

export const BackupsStatus = z.object({
  /** False on an in-memory database (or PostgreSQL): the reason says why. */
  available: z.boolean(),
  reason: z.string().nullable(),
  dir: z.string().nullable(),
  everyHours: z.number(),
  keep: z.number().int(),
  nextAt: z.string().nullable(),
  running: z.boolean(),
  lastFailure: z.object({ at: z.string(), message: z.string(), trigger: z.string() }).nullable(),
  backups: z.array(BackupItem),
});
export type BackupsStatus = z.infer<typeof BackupsStatus>;

const Days = z.number().int().min(1).max(36_500);
export const RetentionSettings = z.object({
  /** Stored answers to picker writes (idempotency), days. */
  idempotencyDays: Days,
  /** Bodies and attachments of sent or failed mail, days. */
  outboxDays: Days,
  /** Used or expired invitations and password resets, days after use or expiry. */
  invitesDays: Days,
  /** Audit log entries, days. */
  auditDays: Days,
});
export type RetentionSettings = z.infer<typeof RetentionSettings>;
export const RetentionBody = RetentionSettings.partial().strict();

/** Defaults; where each comes from is shown beside the field. */
export const DEFAULT_RETENTION: RetentionSettings = { idempotencyDays: 30, outboxDays: 90, invitesDays: 30, auditDays: 730 };
export const RETENTION_NOTES: Record<keyof RetentionSettings, string> = {
  idempotencyDays: 'Default 30 days: a tablet retries within minutes or a shift; kept a month for questions (common practice).',
  outboxDays: 'Default 90 days: the message stays listed, its body and attachments are removed (common practice).',
  invitesDays: 'Default 30 days after a link was used or expired (common practice).',
  auditDays: 'Default 730 days (2 years); check the rules that apply to your site before shortening (common practice).',
};

export const PruneCounts = z.object({
  idempotencyAnswers: z.number().int(),
  outboxBodies: z.number().int(),
  invites: z.number().int(),
  passwordResets: z.number().int(),
  auditEntries: z.number().int(),
});
export type PruneCounts = z.infer<typeof PruneCounts>;

export const RetentionState = z.object({
  settings: RetentionSettings,
  defaults: RetentionSettings,
  lastRun: z.object({ at: z.string(), counts: PruneCounts }).nullable(),
});
export type RetentionState = z.infer<typeof RetentionState>;

/** YYYY-MM-DD or a full ISO time. */
const DateOrTime = z.string().regex(/^\d{4}-\d{2}-\d{2}(T[\d:.]+(Z|[+-]\d{2}:?\d{2})?)?$/, 'a date (YYYY-MM-DD) or ISO time');

export const AuditFilter = z.strictObject({
  userId: z.coerce.number().int().positive().optional(),
  action: z.string().trim().min(1).max(80).optional(),
  from: DateOrTime.optional(),
  to: DateOrTime.optional(),
});
export type AuditFilter = z.infer<typeof AuditFilter>;

export const AuditQuery = AuditFilter.extend({
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});
export type AuditQuery = z.infer<typeof AuditQuery>;

export const ExportFormat = z.enum(['xlsx', 'csv']);
export type ExportFormat = z.infer<typeof ExportFormat>;
export const AuditExportQuery = AuditFilter.extend({ format: ExportFormat.default('xlsx') });
/** Admins' view over every site: one site, or all (including account events with no site). */
export const AllAuditQuery = AuditQuery.extend({ siteId: z.coerce.number().int().positive().optional() });
export const AllAuditExportQuery = AuditExportQuery.extend({ siteId: z.coerce.number().int().positive().optional() });

export const AuditItem = z.object({
  id: z.number().int(),
  at: z.string(),
  siteId: z.number().int().nullable(),
  siteCode: z.string().nullable(),
  userId: z.number().int().nullable(),
  userName: z.string().nullable(),
  userRole: z.string().nullable(),
  action: z.string(),
  subject: z.string().nullable(),
  detail: z.string().nullable(),
  device: z.string().nullable(),
});
export type AuditItem = z.infer<typeof AuditItem>;

export const AuditPage = z.object({
  items: z.array(AuditItem),
  total: z.number().int(),
  page: z.number().int(),
  pageSize: z.number().int(),
  /** For the filters: every action and every person found in this log. */
  actions: z.array(z.string()),
  people: z.array(z.object({ id: z.number().int(), name: z.string() })),
});
export type AuditPage = z.infer<typeof AuditPage>;

export const ExportQuery = z.strictObject({ format: ExportFormat.default('xlsx') });
export const EXPORT_KINDS = ['orders', 'pick-lines', 'users'] as const;
export type ExportKind = (typeof EXPORT_KINDS)[number];
