import type { StudyStatus } from '@shared/studies';

export const STATUS_LABEL: Record<StudyStatus, string> = { queued: 'Queued', running: 'Running', done: 'Done', failed: 'Failed', cancelled: 'Cancelled' };
/** Tag colours always come with the word, never alone. */
export const STATUS_TYPE: Record<StudyStatus, 'default' | 'info' | 'success' | 'error' | 'warning'> = {
  queued: 'default',
  running: 'info',
  done: 'success',
  failed: 'error',
  cancelled: 'warning',
};
