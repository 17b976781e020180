import type { TripStatus, WaveSummary } from '@shared/waves';

export const WAVE_STATUS_LABEL: Record<WaveSummary['status'], string> = {
  released: 'Released',
  picking: 'Being picked',
  completed: 'Completed',
  cancelled: 'Cancelled',
};

export const TRIP_STATUS_LABEL: Record<TripStatus, string> = {
  released: 'Waiting for a picker',
  assigned: 'Assigned',
  picking: 'Being picked',
  done: 'Done',
  cancelled: 'Cancelled',
};
