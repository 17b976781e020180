import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { ApiError } from '@client/api/http';
import { apiErrorToFields, issuesToFields, useFormErrors } from '@client/composables/useFormErrors';
import { SiteSettings } from '@shared/sites';
import { Pin } from '@shared/auth';

describe('form errors', () => {
  it('keys zod issues by their dotted path, first message per field', () => {
    const result = z.object({ settings: SiteSettings.partial() }).safeParse({ settings: { walkingSpeedMps: -1, secondsPerLine: 9999 } });
    expect(result.success).toBe(false);
    const fields = issuesToFields(result.error?.issues ?? []);
    expect(Object.keys(fields).sort()).toEqual(['settings.secondsPerLine', 'settings.walkingSpeedMps']);
  });

  it('reads the server validation details into the same shape', () => {
    const error = new ApiError('validation_failed', 'Check the fields.', 400, [
      { field: 'settings.walkingSpeedMps', message: 'Too big' },
      { field: 'name', message: 'Required' },
    ]);
    expect(apiErrorToFields(error)).toEqual({ 'settings.walkingSpeedMps': 'Too big', name: 'Required' });
    expect(apiErrorToFields(new Error('x'))).toEqual({});
  });

  it('says Required for an empty number field, and puts the message under that field', () => {
    const form = useFormErrors();
    expect(form.check(z.object({ totes: z.number().int() }), { totes: null })).toBeNull();
    expect(form.item('totes')).toEqual({ validationStatus: 'error', feedback: 'Required' });
    expect(form.item('name')).toEqual({ validationStatus: undefined, feedback: undefined });
  });

  it('shows the wait time for too many attempts', () => {
    const form = useFormErrors();
    form.fromError(new ApiError('too_many_attempts', 'Too many sign-in attempts.', 429, { retryAfterSeconds: 29.2 }));
    expect(form.general.value).toBe('Too many sign-in attempts. Try again in 30 s.');
    expect(form.code.value).toBe('too_many_attempts');
  });
});

describe('friendly messages', () => {
  const messages = (schema: z.ZodType, value: unknown) => {
    const form = useFormErrors();
    form.check(schema, value);
    return { ...form.fields };
  };
  it('says Required, At most, More than instead of zod wording', () => {
    expect(messages(z.object({ name: z.string().min(1) }), { name: '' })).toEqual({ name: 'Required' });
    expect(messages(SiteSettings.partial(), { walkingSpeedMps: 5 })).toEqual({ walkingSpeedMps: 'At most 3' });
    expect(messages(SiteSettings.partial(), { walkingSpeedMps: 0 })).toEqual({ walkingSpeedMps: 'More than 0' });
    expect(messages(z.object({ siteIds: z.array(z.number()).min(1) }), { siteIds: [] })).toEqual({ siteIds: 'Choose at least one' });
  });
  it("keeps a schema's own message", () => {
    expect(messages(z.object({ pin: Pin }), { pin: '12' })).toEqual({ pin: '6 to 12 digits' });
  });
});
