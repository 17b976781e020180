/**
 * Floor-plan routes. Supervisors and admins manage plans; engineers read them and generate plans for
 * what-if studies; every signed-in member of the site (pickers too) may read the active plan for the
 * trip map. Fixed paths (`active`, `jobs`) come before `:planId` so they are not read as ids.
 */
import { z } from 'zod';
import type { Role } from '../../shared/common';
import { Ok } from '../../shared/common';
import {
  ActivateFloorPlanBody,
  ActivationCheck,
  ActiveFloorPlan,
  CloseSegmentBody,
  ClosureResult,
  DistanceAnswer,
  DistanceQuery,
  FloorPlanDetail,
  FloorPlanJob,
  FloorPlanSummary,
  GenerateFloorPlanBody,
  PlanGeometry,
  RenameFloorPlanBody,
} from '../../shared/floor-plans';
import { AppError, notFound } from '../http/errors';
import { pathId } from '../http/path-id';
import { sendAttachment, XLSX_TYPE } from '../http/attachment';
import { openEventStream } from '../http/event-stream';
import { defineRoute } from '../http/route';
import { buildFloorPlanTemplate, rowIssuesToCsv, rowIssuesToXlsx } from './import';
import * as service from './floor-plans.service';
import { cancelJob, getJob, watchJob } from './jobs';
import type { Deps } from '../deps';
import { skusWithoutBinCsv, skusWithoutBinXlsx } from './activation-check';

const MANAGE: readonly Role[] = ['supervisor', 'admin'];
const OFFICE: readonly Role[] = ['supervisor', 'admin', 'engineer'];
const GENERATE: readonly Role[] = ['supervisor', 'admin', 'engineer'];

const base = '/api/sites/:siteId/floor-plans';

const planIdOf = (params: { planId: string }) => pathId(params.planId, 'Floor plan');

async function mustJob(deps: Deps, siteId: number, id: string): Promise<FloorPlanJob> {
  const job = await getJob(deps, siteId, id);
  if (!job) throw notFound('Job');
  return job;
}

export const floorPlanRoutes = [
  defineRoute({
    method: 'get',
    path: '/api/floor-plans/template',
    access: OFFICE,
    summary: 'The floor-plan workbook template (instructions sheet and a worked example)',
    handler: ({ res }) => sendAttachment(res, buildFloorPlanTemplate(), XLSX_TYPE, 'aislewright-floor-plan-template.xlsx'),
  }),
  defineRoute({
    method: 'get',
    path: base,
    access: OFFICE,
    summary: "The site's floor plans, newest version first",
    response: z.array(FloorPlanSummary),
    handler: ({ deps, siteId }) => service.listPlans(deps.db, siteId),
  }),
  defineRoute({
    method: 'get',
    path: `${base}/active`,
    access: 'signed-in',
    summary: 'The active plan with its geometry and closures (404 no_active_plan when none)',
    response: ActiveFloorPlan,
    handler: ({ deps, siteId }) => service.getActivePlan(deps.db, siteId),
  }),
  defineRoute({
    method: 'post',
    path: `${base}/uploads`,
    access: MANAGE,
    upload: 'single-file',
    status: 202,
    summary: 'Upload a floor-plan workbook (multipart field "file", optional field "name"); starts a check-and-build job',
    response: FloorPlanJob,
    handler: ({ deps, req, siteId, user }) => {
      const file = req.file;
      if (!file)
        throw new AppError('validation', 'validation_failed', 'Send the workbook in the multipart field "file"', [{ field: 'file', message: 'required' }]);
      const name = typeof (req.body as { name?: unknown } | undefined)?.name === 'string' ? (req.body as { name: string }).name.slice(0, 120) : undefined;
      return service.startUpload(deps, {
        siteId: siteId,
        userId: user.id,
        bytes: new Uint8Array(file.buffer),
        filename: file.originalname,
        ...(name ? { name } : {}),
      });
    },
  }),
  defineRoute({
    method: 'post',
    path: `${base}/generate`,
    access: GENERATE,
    status: 202,
    summary: 'Generate a rectangular plan from parameters (metres); starts a build job',
    body: GenerateFloorPlanBody,
    response: FloorPlanJob,
    handler: ({ deps, body, siteId, user }) => service.startGenerate(deps, { siteId: siteId, userId: user.id, name: body.name, params: body.params }),
  }),
  defineRoute({
    method: 'get',
    path: `${base}/jobs/:jobId`,
    access: OFFICE,
    summary: 'A build job: phase, fraction, and the error table when the file had problems',
    response: FloorPlanJob,
    handler: ({ deps, siteId, params }) => mustJob(deps, siteId, params.jobId),
  }),
  defineRoute({
    method: 'post',
    path: `${base}/jobs/:jobId/cancel`,
    access: GENERATE,
    summary: 'Cancel a running build job: its process stops and nothing is saved (409 once it has ended)',
    response: FloorPlanJob,
    handler: async ({ deps, siteId, params, user }) => {
      const job = await mustJob(deps, siteId, params.jobId);
      // Who may start the build may stop it: uploads are for supervisors and admins only.
      if (job.kind === 'upload' && !MANAGE.includes(user.role))
        throw new AppError('forbidden', 'forbidden', 'Only a supervisor or an admin can cancel an upload');
      return (await cancelJob(deps, siteId, job.id)) ?? Promise.reject(notFound('Job'));
    },
  }),
  defineRoute({
    method: 'get',
    path: `${base}/jobs/:jobId/events`,
    access: OFFICE,
    summary: 'A build job as server-sent events (`progress` on every change, `end` once)',
    handler: async ({ deps, req, res, siteId, params }) => {
      const job = await mustJob(deps, siteId, params.jobId);
      const stream = openEventStream(req, res);
      stream.send('progress', job);
      if (job.finishedAt) {
        stream.send('end', job);
        stream.end();
        return undefined;
      }
      const stop = watchJob(
        deps,
        siteId,
        job.id,
        (j) => stream.send('progress', j),
        (j) => {
          stream.send('end', j);
          stop?.();
          stream.end();
        },
      );
      stream.onClose(() => stop?.());
      return undefined;
    },
  }),
  defineRoute({
    method: 'get',
    path: `${base}/jobs/:jobId/errors`,
    access: OFFICE,
    summary: 'The error table of a refused upload, as xlsx (default) or CSV (?format=csv)',
    query: z.strictObject({ format: z.enum(['xlsx', 'csv']).default('xlsx') }),
    handler: async ({ deps, res, siteId, params, query }) => {
      const job = await mustJob(deps, siteId, params.jobId);
      if (job.status !== 'invalid') throw new AppError('conflict', 'no_errors', 'This job has no error table');
      return query.format === 'csv'
        ? sendAttachment(res, rowIssuesToCsv(job.errors), 'text/csv; charset=utf-8', 'floor-plan-errors.csv')
        : sendAttachment(res, rowIssuesToXlsx(job.errors), XLSX_TYPE, 'floor-plan-errors.xlsx');
    },
  }),
  defineRoute({
    method: 'get',
    path: `${base}/:planId`,
    access: OFFICE,
    summary: 'One plan: stats, warnings, open closures and unreachable bins',
    response: FloorPlanDetail,
    handler: ({ deps, siteId, params }) => service.getPlanDetail(deps.db, siteId, planIdOf(params)),
  }),
  defineRoute({
    method: 'get',
    path: `${base}/:planId/geometry`,
    access: OFFICE,
    summary: "A plan's aisles, cross aisles, bins and depots (metres)",
    response: PlanGeometry,
    handler: ({ deps, siteId, params }) => service.getGeometry(deps.db, siteId, planIdOf(params)),
  }),
  defineRoute({
    method: 'get',
    path: `${base}/:planId/distance`,
    access: OFFICE,
    summary: 'Shortest walking distance between two bins (metres; null when no walk joins them)',
    query: DistanceQuery,
    response: DistanceAnswer,
    handler: ({ deps, siteId, params, query }) => service.binDistance(deps.db, siteId, planIdOf(params), query.from, query.to),
  }),
  defineRoute({
    method: 'patch',
    path: `${base}/:planId`,
    access: MANAGE,
    summary: 'Rename a plan (not retired ones or ones used by waves)',
    body: RenameFloorPlanBody,
    response: FloorPlanDetail,
    handler: ({ deps, siteId, params, body, user }) => service.renamePlan(deps.db, siteId, planIdOf(params), body.name, user.id),
  }),
  defineRoute({
    method: 'delete',
    path: `${base}/:planId`,
    access: MANAGE,
    summary: 'Delete a draft',
    response: Ok,
    handler: async ({ deps, siteId, params, user }) => {
      await service.deleteDraft(deps.db, siteId, planIdOf(params), user.id);
      return { ok: true as const };
    },
  }),
  defineRoute({
    method: 'get',
    path: `${base}/:planId/activation-check`,
    access: OFFICE,
    summary: 'What activating the plan would take away: SKUs without a bin, open orders it cannot place, waves still running on another plan',
    response: ActivationCheck,
    handler: ({ deps, siteId, params }) => service.activationCheck(deps.db, siteId, planIdOf(params)),
  }),
  defineRoute({
    method: 'get',
    path: `${base}/:planId/activation-check/skus-without-bin`,
    access: OFFICE,
    summary: 'Every SKU whose bin is not on the plan, as xlsx (default) or CSV (?format=csv)',
    query: z.strictObject({ format: z.enum(['xlsx', 'csv']).default('xlsx') }),
    handler: async ({ deps, res, siteId, params, query }) => {
      const check = await service.activationCheckFull(deps.db, siteId, planIdOf(params));
      const name = `skus-without-bin-v${check.plan.version}`;
      return query.format === 'csv'
        ? sendAttachment(res, skusWithoutBinCsv(check.allSkusWithoutBin), 'text/csv; charset=utf-8', `${name}.csv`)
        : sendAttachment(res, skusWithoutBinXlsx(check.allSkusWithoutBin), XLSX_TYPE, `${name}.xlsx`);
    },
  }),
  defineRoute({
    method: 'post',
    path: `${base}/:planId/activate`,
    access: MANAGE,
    summary:
      'Activate a draft, or a retired plan again (rollback); the active plan is retired. 409 activation_needs_acknowledgement unless { "acknowledge": true } when SKUs or open orders would lose their bin',
    body: ActivateFloorPlanBody,
    response: FloorPlanDetail,
    handler: ({ deps, siteId, params, user, body }) =>
      service.activatePlan(deps.db, siteId, planIdOf(params), user.id, { acknowledge: body.acknowledge ?? false }),
  }),
  defineRoute({
    method: 'post',
    path: `${base}/:planId/closures`,
    access: MANAGE,
    status: 201,
    summary: 'Close a stretch of an aisle or cross aisle; distances are recomputed and unreachable bins listed',
    body: CloseSegmentBody,
    response: ClosureResult,
    handler: ({ deps, siteId, params, body, user }) => service.closeSegment(deps.db, siteId, planIdOf(params), body, user.id),
  }),
  defineRoute({
    method: 'delete',
    path: `${base}/:planId/closures/:closureId`,
    access: MANAGE,
    summary: 'Reopen a closed stretch; distances are recomputed',
    response: ClosureResult,
    handler: ({ deps, siteId, params, user }) => service.reopenSegment(deps.db, siteId, planIdOf(params), pathId(params.closureId, 'Closure'), user.id),
  }),
];
