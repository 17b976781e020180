import type { z } from 'zod';
import type { FieldIssue } from '../../shared/common';
import { AppError } from './errors';

/** zod issues → `[{ field, message }]`, unknown keys named one by one. */
export function fieldIssues(error: z.ZodError): FieldIssue[] {
  const out: FieldIssue[] = [];
  for (const issue of error.issues) {
    const base = issue.path.map(String).join('.');
    if (issue.code === 'unrecognized_keys') {
      for (const key of issue.keys) out.push({ field: base ? `${base}.${key}` : key, message: 'unknown field' });
    } else {
      out.push({ field: base || '(body)', message: issue.message });
    }
  }
  return out;
}

/** Parses `value` with `schema` or throws a 400 naming every offending field. */
export function parseOr400<S extends z.ZodType>(schema: S, value: unknown, where: string): z.output<S> {
  const r = schema.safeParse(value);
  if (r.success) return r.data;
  const issues = fieldIssues(r.error);
  throw new AppError('validation', 'validation_failed', `Invalid ${where}: ${issues.map((i) => `${i.field} (${i.message})`).join(', ')}`, issues);
}
