/**
 * Wave previews: planned in a worker, kept in memory for an hour so the supervisor can look, change
 * options and release one. A preview is bound to its site, plan and the plan's closure version.
 */
import { randomUUID } from 'node:crypto';
import type { WaveJob, WavePreview } from '../../shared/waves';

const KEEP_MS = 60 * 60_000;

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

interface Entry {
  job: WaveJob;
  ctx: PreviewContext;
  at: number;
}

const entries = new Map<string, Entry>();

function sweep(): void {
  const cutoff = Date.now() - KEEP_MS;
  for (const [id, e] of entries) if (e.at < cutoff) entries.delete(id);
}

export function createPreviewJob(ctx: PreviewContext): WaveJob {
  sweep();
  const job: WaveJob = { id: randomUUID(), state: 'running', progress: 0, phase: 'queued', error: null, preview: null };
  entries.set(job.id, { job, ctx, at: Date.now() });
  return { ...job };
}

export function updatePreviewJob(id: string, patch: Partial<WaveJob>): void {
  const e = entries.get(id);
  if (e) Object.assign(e.job, patch);
}

export function getPreviewJob(siteId: number, id: string): WaveJob | undefined {
  const e = entries.get(id);
  return e && e.ctx.siteId === siteId ? { ...e.job } : undefined;
}

export function getPreview(siteId: number, id: string): { preview: WavePreview; ctx: PreviewContext } | undefined {
  const e = entries.get(id);
  return e && e.ctx.siteId === siteId && e.job.preview ? { preview: e.job.preview, ctx: e.ctx } : undefined;
}
