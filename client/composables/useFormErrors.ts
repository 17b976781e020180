import { reactive, ref } from 'vue';
import type { z } from 'zod';
import { ApiError } from '@client/api/http';
import { describeError } from './useAsync';

export type FieldErrors = Record<string, string>;

interface IssueLike {
  code?: string;
  input?: unknown;
  origin?: string;
  minimum?: unknown;
  maximum?: unknown;
  inclusive?: boolean;
}

/**
 * Plain words for the common zod failures ("Required", "At most 3") in place of its developer wording.
 * Schemas with their own message (passwords, PINs, site codes) keep it: zod prefers those.
 */
export function friendlyMessage(issue: IssueLike): string | undefined {
  const { code, input, origin, minimum, maximum, inclusive } = issue;
  if (code === 'invalid_type' && (input === null || input === undefined || input === '')) return 'Required';
  if (code === 'too_small') {
    if (origin === 'string') return Number(minimum) <= 1 ? 'Required' : `At least ${String(minimum)} characters`;
    if (origin === 'array') return Number(minimum) <= 1 ? 'Choose at least one' : `Choose at least ${String(minimum)}`;
    if (origin === 'number') return inclusive ? `At least ${String(minimum)}` : `More than ${String(minimum)}`;
  }
  if (code === 'too_big') {
    if (origin === 'string') return `At most ${String(maximum)} characters`;
    if (origin === 'number') return inclusive ? `At most ${String(maximum)}` : `Less than ${String(maximum)}`;
  }
  return undefined;
}

/** Field messages from a zod error, keyed by the dotted path (`settings.walkingSpeedMps`). */
export function issuesToFields(issues: readonly { path: readonly PropertyKey[]; message: string }[]): FieldErrors {
  const fields: FieldErrors = {};
  for (const issue of issues) {
    const key = issue.path.map(String).join('.');
    fields[key] ??= issue.message;
  }
  return fields;
}

/** Field messages from the server's validation details (`[{ field, message }]`). */
export function apiErrorToFields(error: unknown): FieldErrors {
  const fields: FieldErrors = {};
  if (error instanceof ApiError) for (const issue of error.fieldIssues) fields[issue.field] ??= issue.message;
  return fields;
}

/**
 * Errors for one form: per field (shown under the field) and one general line (shown above the buttons).
 * The same shared zod schema the server uses checks the form first.
 */
export function useFormErrors() {
  const fields = reactive<FieldErrors>({});
  const general = ref<string | null>(null);
  /** The server's error code, for forms that react to one (`invalid_token`, `too_many_attempts`). */
  const code = ref<string | null>(null);

  function clear(): void {
    for (const key of Object.keys(fields)) delete fields[key];
    general.value = null;
    code.value = null;
  }

  function check<S extends z.ZodType>(schema: S, value: unknown): z.infer<S> | null {
    clear();
    const parsed = schema.safeParse(value, { error: friendlyMessage });
    if (parsed.success) return parsed.data;
    Object.assign(fields, issuesToFields(parsed.error.issues));
    if (Object.keys(fields).length === 0) general.value = 'Check the form.';
    return null;
  }

  function fromError(error: unknown): void {
    clear();
    const mapped = apiErrorToFields(error);
    Object.assign(fields, mapped);
    general.value = describeError(error);
    code.value = error instanceof ApiError ? error.code : null;
  }

  /**
   * Props for an NFormItem: red state plus the message right under the field. With `unit`, a bound
   * such as "At most 3" reads "At most 3 m/s" (numbers always carry units).
   */
  function item(field: string, unit?: string): { validationStatus: 'error' | undefined; feedback: string | undefined } {
    const message = fields[field];
    const withUnit = message && unit && /^(At most|At least|More than|Less than) -?[\d.]+$/.test(message) ? `${message} ${unit}` : message;
    return { validationStatus: message ? 'error' : undefined, feedback: withUnit };
  }

  return { fields, general, code, clear, check, fromError, item };
}
