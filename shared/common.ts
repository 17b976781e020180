import { z } from 'zod';

/** Every error response body: `{ error: { code, message, details? } }`. */
export const ErrorBody = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    details: z.unknown().optional(),
  }),
});
export type ErrorBody = z.infer<typeof ErrorBody>;

/** Validation details: one entry per offending field. */
export const FieldIssue = z.object({ field: z.string(), message: z.string() });
export type FieldIssue = z.infer<typeof FieldIssue>;

export const Id = z.coerce.number().int().positive();

export const Role = z.enum(['admin', 'supervisor', 'picker', 'engineer']);
export type Role = z.infer<typeof Role>;
export const ROLES: readonly Role[] = Role.options;

export const Health = z.object({ status: z.literal('ok'), db: z.literal('ok'), version: z.string() });
export type Health = z.infer<typeof Health>;

/** The custom header every unsafe request carries (CSRF defence together with Origin checks). */
export const CSRF_HEADER = 'x-aislewright';
export const CSRF_VALUE = '1';

export const Ok = z.object({ ok: z.literal(true) });
export type Ok = z.infer<typeof Ok>;
