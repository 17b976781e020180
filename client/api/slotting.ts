import {
  SlottingApplyResult,
  SlottingHistoryUpload,
  SlottingRunDetail,
  SlottingRunSummary,
  type SlottingApplyBody,
  type SlottingInputsBody,
} from '@shared/slotting';
import { http } from './http';
import { uploadFile } from './upload';

const base = (siteId: number) => `/api/sites/${siteId}/slotting`;

export const listSlottingRuns = (siteId: number) => http('GET', `${base(siteId)}/runs`, SlottingRunSummary.array());
export const getSlottingRun = (siteId: number, id: number) => http('GET', `${base(siteId)}/runs/${id}`, SlottingRunDetail);
export const createSlottingRun = (siteId: number, body: SlottingInputsBody) => http('POST', `${base(siteId)}/runs`, SlottingRunSummary, { body });
export const cancelSlottingRun = (siteId: number, id: number) => http('POST', `${base(siteId)}/runs/${id}/cancel`, SlottingRunSummary);
export const applySlottingRun = (siteId: number, id: number, body: SlottingApplyBody) =>
  http('POST', `${base(siteId)}/runs/${id}/apply`, SlottingApplyResult, { body });
export const uploadSlottingHistory = (siteId: number, file: File, onProgress?: (f: number) => void) =>
  uploadFile(`${base(siteId)}/histories`, file, file.name, SlottingHistoryUpload, onProgress);
/** Plain downloads: the browser keeps the session cookie on a same-origin link. */
export const slottingMovesUrl = (siteId: number, id: number) => `${base(siteId)}/runs/${id}/moves.xlsx`;
export const slottingSkusUrl = (siteId: number, id: number) => `${base(siteId)}/runs/${id}/skus.xlsx`;
