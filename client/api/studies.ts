import { z } from 'zod';
import { PlanGeometry } from '@shared/floor-plans';
import { CandidateLayout, CandidateLayoutUpload, StudyDetail, StudyRoute, StudySummary, type RoutingMethodKey, type StudyInputsBody } from '@shared/studies';
import { Ok } from '@shared/common';
import { http } from './http';
import { uploadFile } from './upload';

const base = (siteId: number) => `/api/sites/${siteId}/studies`;

export const StudyPlan = z.object({
  geometry: PlanGeometry,
  closures: z.array(z.object({ kind: z.enum(['aisle', 'cross_aisle']), code: z.string(), from: z.number(), to: z.number() })),
});
export type StudyPlan = z.infer<typeof StudyPlan>;

/** `withArchived`: archived studies too (the "Show archived" toggle). */
export const listStudies = (siteId: number, withArchived = false) =>
  http('GET', withArchived ? `${base(siteId)}?archived=include` : base(siteId), StudySummary.array());
export const archiveStudy = (siteId: number, id: number, archived: boolean) =>
  http('POST', `${base(siteId)}/${id}/${archived ? 'archive' : 'unarchive'}`, StudySummary);
export const listCandidateLayouts = (siteId: number) => http('GET', `${base(siteId)}/layouts`, CandidateLayout.array());
/** A candidate layout workbook for a what-if; the answer holds the row-by-row problems when it was refused. */
export const uploadCandidateLayout = (siteId: number, file: Blob, filename: string, onProgress?: (fraction: number) => void) =>
  uploadFile(`${base(siteId)}/layouts`, file, filename, CandidateLayoutUpload, onProgress);
export const getStudy = (siteId: number, id: number) => http('GET', `${base(siteId)}/${id}`, StudyDetail);
export const createStudy = (siteId: number, body: StudyInputsBody) => http('POST', base(siteId), StudySummary, { body });
export const cancelStudy = (siteId: number, id: number) => http('POST', `${base(siteId)}/${id}/cancel`, StudySummary);
export const deleteStudy = (siteId: number, id: number) => http('DELETE', `${base(siteId)}/${id}`, Ok);
export const rerunStudy = (siteId: number, id: number) => http('POST', `${base(siteId)}/${id}/rerun`, StudySummary);
export const getStudyPlan = (siteId: number, id: number, variant: string) =>
  http('GET', `${base(siteId)}/${id}/plans/${encodeURIComponent(variant)}`, StudyPlan);
export const getStudyRoute = (siteId: number, id: number, q: { variant: string; trip: number; method: RoutingMethodKey }) =>
  http('GET', `${base(siteId)}/${id}/route?${new URLSearchParams({ variant: q.variant, trip: String(q.trip), method: q.method })}`, StudyRoute);
/** The workbook is a plain download: the browser keeps the session cookie on a same-origin link. */
export const studyWorkbookUrl = (siteId: number, id: number) => `${base(siteId)}/${id}/export.xlsx`;
