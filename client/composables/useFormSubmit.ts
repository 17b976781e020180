import { ref } from 'vue';
import type { z } from 'zod';
import { useFormErrors, type FieldErrors } from './useFormErrors';

export interface FormSubmitOptions<S extends z.ZodType> {
  /** The same shared schema the server validates with. */
  schema: S;
  /** What to check: usually the form object itself. */
  value: () => unknown;
  /** Checks the schema cannot make (a repeated password); false stops the submit with its field message. */
  also?: (fields: FieldErrors) => boolean;
  /** Send the checked body; a throw puts the server's field errors and message on the form. */
  send: (body: z.infer<S>) => Promise<void>;
  /** After the error is on the form (e.g. empty the password field). */
  failed?: (error: unknown) => void;
}

/**
 * Every form's submit, written once: check with the shared schema, send while `busy`, and turn an error
 * into field messages plus one general line (`errors`). A second submit while one is on its way does nothing.
 */
export function useFormSubmit<S extends z.ZodType>(options: FormSubmitOptions<S>) {
  const errors = useFormErrors();
  const busy = ref(false);

  async function submit(): Promise<boolean> {
    if (busy.value) return false;
    const body = errors.check(options.schema, options.value());
    if (!body) return false;
    if (options.also && !options.also(errors.fields)) return false;
    busy.value = true;
    try {
      await options.send(body);
      return true;
    } catch (error) {
      errors.fromError(error);
      options.failed?.(error);
      return false;
    } finally {
      busy.value = false;
    }
  }

  return { errors, busy, submit };
}
