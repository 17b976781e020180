import type { FieldErrors } from '@client/composables/useFormErrors';

/** False, with the message under the repeat field, when the two typings differ. */
export function repeatMatches(fields: FieldErrors, password: string, repeat: string): boolean {
  if (repeat === password) return true;
  fields.repeat = 'The two passwords are not the same.';
  return false;
}
