import type { Request } from 'express';
import { z } from 'zod';
import { SlottingApplyBody, SlottingApplyResult, SlottingHistoryUpload, SlottingInputs, SlottingRunDetail, SlottingRunSummary } from '../../shared/slotting';
import { AppError } from '../http/errors';
import { pathId } from '../http/path-id';
import { sendAttachment, XLSX_TYPE } from '../http/attachment';
import { defineRoute } from '../http/route';
import { skuRowsOf } from './slotting.repository';
import { applyRun, cancelRun, createRun, getRun, listRuns, uploadHistory } from './slotting.service';
import { moveListWorkbook, newSkuMasterWorkbook } from './workbooks';

/** Engineers and supervisors run slotting; supervisors (and admins) apply its moves to the SKU master. */
const RUN_ROLES = ['engineer', 'supervisor'] as const;
const APPLY_ROLES = ['supervisor', 'admin'] as const;
const base = '/api/sites/:siteId/slotting';
const idOf = (params: { id: string }) => pathId(params.id, 'Slotting run');

const fileOf = (req: Request) => {
  if (!req.file) throw new AppError('validation', 'validation_failed', 'Attach the file in the field "file"', [{ field: 'file', message: 'missing' }]);
  return req.file;
};

export const slottingRoutes = [
  defineRoute({
    method: 'get',
    path: `${base}/runs`,
    access: [...RUN_ROLES, 'admin'],
    summary: "The site's slotting runs, newest first",
    response: z.array(SlottingRunSummary),
    handler: ({ deps, siteId }) => listRuns(deps, siteId),
  }),
  defineRoute({
    method: 'post',
    path: `${base}/histories`,
    access: RUN_ROLES,
    summary: 'Upload an order history (orders file: order, sku, qty, due as the day) for slotting runs',
    upload: 'single-file',
    response: SlottingHistoryUpload,
    status: 201,
    handler: ({ deps, siteId, user, req }) => uploadHistory(deps, siteId, user.id, fileOf(req)),
  }),
  defineRoute({
    method: 'post',
    path: `${base}/runs`,
    access: RUN_ROLES,
    summary: 'Start a slotting run on the active plan; poll it for progress',
    status: 202,
    body: SlottingInputs,
    response: SlottingRunSummary,
    handler: ({ deps, siteId, user, body }) => createRun(deps, siteId, user.id, body),
  }),
  defineRoute({
    method: 'get',
    path: `${base}/runs/:id`,
    access: [...RUN_ROLES, 'admin'],
    summary: 'A slotting run: inputs, progress, then its figures and moves',
    response: SlottingRunDetail,
    handler: ({ deps, siteId, params }) => getRun(deps, siteId, idOf(params)),
  }),
  defineRoute({
    method: 'post',
    path: `${base}/runs/:id/cancel`,
    access: RUN_ROLES,
    summary: 'Stop a queued or running slotting run',
    response: SlottingRunSummary,
    handler: ({ deps, siteId, params }) => cancelRun(deps, siteId, idOf(params)),
  }),
  defineRoute({
    method: 'post',
    path: `${base}/runs/:id/apply`,
    access: APPLY_ROLES,
    summary: "Apply a run's moves (all, or the chosen SKUs') to the SKU master, audited",
    body: SlottingApplyBody,
    response: SlottingApplyResult,
    handler: ({ deps, siteId, user, params, body }) => applyRun(deps, siteId, user.id, idOf(params), body),
  }),
  defineRoute({
    method: 'get',
    path: `${base}/runs/:id/moves.xlsx`,
    access: [...RUN_ROLES, 'admin'],
    summary: "The run's move list as a workbook",
    handler: async ({ deps, siteId, params, res }) => {
      const run = await getRun(deps, siteId, idOf(params));
      if (!run.results) throw new AppError('conflict', 'run_not_done', 'This run has no results yet');
      return sendAttachment(res, moveListWorkbook(run.results.moves), XLSX_TYPE, `slotting-${run.id}-moves.xlsx`);
    },
  }),
  defineRoute({
    method: 'get',
    path: `${base}/runs/:id/skus.xlsx`,
    access: [...RUN_ROLES, 'admin'],
    summary: 'The SKU master after the moves, in the SKU import format',
    handler: async ({ deps, siteId, params, res }) => {
      const run = await getRun(deps, siteId, idOf(params));
      if (!run.results) throw new AppError('conflict', 'run_not_done', 'This run has no results yet');
      const rows = await skuRowsOf(deps.db, siteId);
      const moved = new Map(run.results.moves.map((m) => [m.sku, m.toBin]));
      const records = rows.map((r) => ({ sku: r.sku, description: r.description, bin: r.bin, unitWeightKg: r.unit_weight_kg, unitVolumeL: r.unit_volume_l }));
      return sendAttachment(res, newSkuMasterWorkbook(records, moved), XLSX_TYPE, `slotting-${run.id}-skus.xlsx`);
    },
  }),
];
