/**
 * Wave previews as jobs of the app's job runner (server/workers/jobs.ts): planned in a job process,
 * kept an hour after they end so the supervisor can look, change options and release one. On
 * PostgreSQL any instance plans a preview and any instance answers for it (its state and outcome are
 * in the database). A preview is bound to its site, plan and the plan's closure version.
 */
import type { WaveJob, WavePreview, WavePreviewBody } from '../../shared/waves';
import type { Deps } from '../deps';
import type { JobRecord } from '../workers/jobs';

export const WAVE_PREVIEW_JOB = 'wave-preview';

export interface PreviewContext {
  siteId: number;
  planId: number;
  closureVersion: number;
  userId: number;
  depotIdx: number;
  cartProfileId: number;
  /** Order id of each ref in the preview. */
  orderIds: Map<string, number>;
}

/** What a preview job is given (JSON: it may travel to another instance). */
export interface PreviewJobData {
  siteId: number;
  userId: number;
  planId: number;
  closureVersion: number;
  cartProfileId: number;
  body: WavePreviewBody;
}

/** What a preview job answers (JSON): the preview, what it was planned on and, per order ref, its order id. */
export interface PreviewOutcome {
  preview: WavePreview;
  context: Omit<PreviewContext, 'orderIds'>;
  orderIds: [string, number][];
}

/** A failed preview's message is stored as `code: message`. */
export const PLANNING_FAILED = 'planning_failed';

export function toWaveJob(r: JobRecord<PreviewOutcome>): WaveJob {
  const running = r.state === 'queued' || r.state === 'running';
  return {
    id: r.id,
    state: running ? 'running' : r.state === 'done' ? 'done' : 'failed',
    progress: r.state === 'done' ? 1 : Math.min(0.99, r.progress),
    phase: running ? (r.phase === 'starting' ? 'planning' : (r.phase ?? 'queued')) : r.state === 'done' ? 'done' : 'failed',
    error: r.state === 'failed' || r.state === 'cancelled' ? { code: PLANNING_FAILED, message: r.error ?? 'Planning was cancelled' } : null,
    preview: r.state === 'done' ? (r.result?.preview ?? null) : null,
  };
}

async function previewRecord(deps: Deps, siteId: number, id: string): Promise<JobRecord<PreviewOutcome> | undefined> {
  const r = await deps.jobs.get<PreviewOutcome>(id);
  return r && r.kind === WAVE_PREVIEW_JOB && r.siteId === siteId ? r : undefined;
}

export async function getPreviewJob(deps: Deps, siteId: number, id: string): Promise<WaveJob | undefined> {
  const r = await previewRecord(deps, siteId, id);
  return r ? toWaveJob(r) : undefined;
}

/** A finished preview with what its release needs, or undefined (unknown, expired, of another site, not done). */
export async function getPreview(deps: Deps, siteId: number, id: string): Promise<{ preview: WavePreview; ctx: PreviewContext } | undefined> {
  const r = await previewRecord(deps, siteId, id);
  if (!r || r.state !== 'done' || !r.result) return undefined;
  const { preview, context, orderIds } = r.result;
  return { preview, ctx: { ...context, orderIds: new Map(orderIds) } };
}
