import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { ApiError } from '@client/api/http';
import { useFormSubmit } from '@client/composables/useFormSubmit';

const Body = z.object({ email: z.email() });

describe('useFormSubmit', () => {
  it('sends only a body the shared schema accepts, and holds busy while it is on its way', async () => {
    const sent: unknown[] = [];
    let release!: () => void;
    const form = { email: 'not-an-address' };
    const f = useFormSubmit({
      schema: Body,
      value: () => form,
      send: (body) =>
        new Promise<void>((r) => {
          sent.push(body);
          release = r;
        }),
    });
    expect(await f.submit()).toBe(false);
    expect(sent).toEqual([]);
    expect(f.errors.fields.email).toBeTruthy();

    form.email = 'kai@example.test';
    const running = f.submit();
    expect(f.busy.value).toBe(true);
    // A second submit while the first is on its way sends nothing more.
    expect(await f.submit()).toBe(false);
    release();
    expect(await running).toBe(true);
    expect(f.busy.value).toBe(false);
    expect(sent).toEqual([{ email: 'kai@example.test' }]);
    expect(f.errors.fields.email).toBeUndefined();
  });

  it('puts the server error on the form: field messages, one general line, then the failed hook', async () => {
    const failures: unknown[] = [];
    const f = useFormSubmit({
      schema: Body,
      value: () => ({ email: 'kai@example.test' }),
      send: () => Promise.reject(new ApiError('validation_failed', 'Check the fields.', 400, [{ field: 'email', message: 'Already invited' }])),
      failed: (e) => failures.push(e),
    });
    expect(await f.submit()).toBe(false);
    expect(f.errors.fields.email).toBe('Already invited');
    expect(f.errors.general.value).toBe('Check the fields.');
    expect(f.errors.code.value).toBe('validation_failed');
    expect(failures).toHaveLength(1);
    expect(f.busy.value).toBe(false);
  });

  it('stops at a check the schema cannot make, with its field message', async () => {
    let sent = 0;
    const f = useFormSubmit({
      schema: Body,
      value: () => ({ email: 'kai@example.test' }),
      also: (fields) => {
        fields.repeat = 'The two passwords are not the same.';
        return false;
      },
      send: async () => {
        sent += 1;
      },
    });
    expect(await f.submit()).toBe(false);
    expect(sent).toBe(0);
    expect(f.errors.fields.repeat).toBe('The two passwords are not the same.');
  });
});
