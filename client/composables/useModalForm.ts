import { watch, type Ref } from 'vue';
import type { z } from 'zod';
import { useFormSubmit } from './useFormSubmit';

interface ModalFormOptions<S extends z.ZodType> {
  /** The modal's v-model:show; the form resets each time it opens and closes after a good save. */
  show: Ref<boolean>;
  /** The same shared schema the server validates with. */
  schema: S;
  /** What to check: usually the form object itself. */
  value: () => unknown;
  /** Fill the form for a fresh start (after the errors are cleared). */
  reset: () => void;
  /** Send the checked body; a throw keeps the modal open with the server's field errors. */
  save: (body: z.infer<S>) => Promise<void>;
  /** While false, submitting does nothing (e.g. no user chosen yet). */
  ready?: () => boolean;
}

/** Open/reset, check, save, busy and error handling shared by the admin form modals. */
export function useModalForm<S extends z.ZodType>(options: ModalFormOptions<S>) {
  const form = useFormSubmit({
    schema: options.schema,
    value: options.value,
    send: async (body) => {
      await options.save(body);
      options.show.value = false;
    },
  });

  watch(options.show, (open) => {
    if (!open) return;
    form.errors.clear();
    options.reset();
  });

  async function submit(): Promise<void> {
    if (options.ready && !options.ready()) return;
    await form.submit();
  }

  return { errors: form.errors, busy: form.busy, submit };
}

/** What `BaseFormModal` shows and calls: the busy state, the general error line, the submit. */
export type ModalForm = ReturnType<typeof useModalForm>;
