import { TripDetail, WaveActuals, WaveDetail, WaveJob, WaveSummary, type WavePreviewBody } from '@shared/waves';
import { AutoAssignResult, SignedInPicker } from '@shared/assign';
import { ApiError, http } from './http';

const base = (siteId: number) => `/api/sites/${siteId}`;

export const startPreview = (siteId: number, body: WavePreviewBody) => http('POST', `${base(siteId)}/wave-previews`, WaveJob, { body });
export const getPreviewJob = (siteId: number, id: string) => http('GET', `${base(siteId)}/wave-previews/${id}`, WaveJob);
export const releaseWave = (siteId: number, body: { previewId: string; releaseKey: string; name?: string }) =>
  http('POST', `${base(siteId)}/waves`, WaveDetail, { body });
export const listWaves = (siteId: number) => http('GET', `${base(siteId)}/waves`, WaveSummary.array());
export const getWave = (siteId: number, id: number) => http('GET', `${base(siteId)}/waves/${id}`, WaveDetail);
export const cancelWave = (siteId: number, id: number) => http('POST', `${base(siteId)}/waves/${id}/cancel`, WaveDetail);
export const getWaveActuals = (siteId: number, id: number) => http('GET', `${base(siteId)}/waves/${id}/actuals`, WaveActuals);
export const getTrip = (siteId: number, id: number) => http('GET', `${base(siteId)}/trips/${id}`, TripDetail);

/** Polling failures in a row (network blips) tolerated before giving up with the last error. */
const POLL_RETRIES = 3;

/**
 * Polls a preview job until it ends, reporting progress; resolves to the finished job. A lost
 * connection is retried a few times, then the error is thrown, so the caller can show it instead of
 * waiting forever.
 */
export async function waitForPreview(siteId: number, id: string, onProgress: (job: WaveJob) => void, signal?: AbortSignal): Promise<WaveJob> {
  let failures = 0;
  for (;;) {
    let job: WaveJob;
    try {
      job = await getPreviewJob(siteId, id);
      failures = 0;
    } catch (error) {
      if (!(error instanceof ApiError) || error.status !== 0 || ++failures > POLL_RETRIES || signal?.aborted) throw error;
      await new Promise((r) => setTimeout(r, 500 * failures));
      continue;
    }
    onProgress(job);
    if (job.state !== 'running') return job;
    if (signal?.aborted) return job;
    await new Promise((r) => setTimeout(r, 250));
  }
}
export const listSignedInPickers = (siteId: number) => http('GET', `/api/sites/${siteId}/pickers/signed-in`, SignedInPicker.array());
export const autoAssignWave = (siteId: number, waveId: number) =>
  http('POST', `/api/sites/${siteId}/waves/${waveId}/auto-assign`, AutoAssignResult, { body: {} });
