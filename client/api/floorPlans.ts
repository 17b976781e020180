import { Ok } from '@shared/common';
import {
  ActivationCheck,
  ActiveFloorPlan,
  ClosureResult,
  DistanceAnswer,
  FloorPlanDetail,
  FloorPlanJob,
  FloorPlanSummary,
  PlanGeometry,
  type ActivateFloorPlanBody,
  type CloseSegmentBody,
  type GenerateFloorPlanBody,
} from '@shared/floor-plans';
import { http } from './http';
import { uploadFile } from './upload';

const base = (siteId: number) => `/api/sites/${siteId}/floor-plans`;

export const listFloorPlans = (siteId: number) => http('GET', base(siteId), FloorPlanSummary.array());
export const getFloorPlan = (siteId: number, planId: number) => http('GET', `${base(siteId)}/${planId}`, FloorPlanDetail);
export const getPlanGeometry = (siteId: number, planId: number) => http('GET', `${base(siteId)}/${planId}/geometry`, PlanGeometry);
export const getActivePlan = (siteId: number) => http('GET', `${base(siteId)}/active`, ActiveFloorPlan);
export const activateFloorPlan = (siteId: number, planId: number, body: ActivateFloorPlanBody = {}) =>
  http('POST', `${base(siteId)}/${planId}/activate`, FloorPlanDetail, { body });
export const getActivationCheck = (siteId: number, planId: number) => http('GET', `${base(siteId)}/${planId}/activation-check`, ActivationCheck);
export const deleteFloorPlan = (siteId: number, planId: number) => http('DELETE', `${base(siteId)}/${planId}`, Ok);
export const renameFloorPlan = (siteId: number, planId: number, name: string) =>
  http('PATCH', `${base(siteId)}/${planId}`, FloorPlanDetail, { body: { name } });
export const generateFloorPlan = (siteId: number, body: GenerateFloorPlanBody) => http('POST', `${base(siteId)}/generate`, FloorPlanJob, { body });
export const getFloorPlanJob = (siteId: number, jobId: string) => http('GET', `${base(siteId)}/jobs/${jobId}`, FloorPlanJob);
export const cancelFloorPlanJob = (siteId: number, jobId: string) => http('POST', `${base(siteId)}/jobs/${jobId}/cancel`, FloorPlanJob);
export const closeSegment = (siteId: number, planId: number, body: CloseSegmentBody) =>
  http('POST', `${base(siteId)}/${planId}/closures`, ClosureResult, { body });
export const reopenSegment = (siteId: number, planId: number, closureId: number) =>
  http('DELETE', `${base(siteId)}/${planId}/closures/${closureId}`, ClosureResult);
export const binDistance = (siteId: number, planId: number, from: string, to: string) =>
  http('GET', `${base(siteId)}/${planId}/distance?${new URLSearchParams({ from, to })}`, DistanceAnswer);

/** Links the browser downloads itself (same-origin cookie), so no JavaScript holds the file. */
export const templateUrl = '/api/floor-plans/template';
export const jobErrorsUrl = (siteId: number, jobId: string, format: 'xlsx' | 'csv') => `${base(siteId)}/jobs/${jobId}/errors?format=${format}`;

/**
 * Uploads a workbook (multipart field "file") and resolves with the job that checks and builds it.
 * XMLHttpRequest rather than fetch: it reports the upload's own progress (0…1).
 */
export function uploadFloorPlan(siteId: number, file: Blob, filename: string, onProgress?: (fraction: number) => void): Promise<FloorPlanJob> {
  return uploadFile(`${base(siteId)}/uploads`, file, filename, FloorPlanJob, onProgress);
}

/** Polls a job until it ends, reporting each state; rejects when polling fails. */
export async function followJob(siteId: number, jobId: string, onUpdate: (job: FloorPlanJob) => void, everyMs = 300): Promise<FloorPlanJob> {
  for (;;) {
    const job = await getFloorPlanJob(siteId, jobId);
    onUpdate(job);
    if (job.finishedAt) return job;
    await new Promise((r) => setTimeout(r, everyMs));
  }
}
