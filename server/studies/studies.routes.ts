import { z } from 'zod';
import { PlanGeometry } from '../../shared/floor-plans';
import { Ok } from '../../shared/common';
import {
  CandidateLayout,
  CandidateLayoutUpload,
  StudyDetail,
  StudyInputs,
  StudyListQuery,
  StudyRoute,
  StudyRouteQuery,
  StudySummary,
} from '../../shared/studies';
import { AppError } from '../http/errors';
import { pathId } from '../http/path-id';
import { sendAttachment, XLSX_TYPE } from '../http/attachment';
import { defineRoute } from '../http/route';
import { studyWorkbook } from './export';
import { siteTimeZone } from '../sites/sites.repository';
import {
  archiveStudy,
  cancelStudy,
  createStudy,
  deleteStudy,
  doneStudy,
  getStudy,
  listCandidateLayouts,
  listStudies,
  rerunStudy,
  studyPlan,
  studyRoute,
  uploadCandidateLayout,
} from './studies.service';

/** Engineers run studies; supervisors read and run them too. Pickers and admins are not given them. */
const STUDY_ROLES = ['engineer', 'supervisor'] as const;
const base = '/api/sites/:siteId/studies';
const idOf = (params: { id: string }) => pathId(params.id, 'Study');

const StudyPlan = z.object({
  geometry: PlanGeometry,
  closures: z.array(z.object({ kind: z.enum(['aisle', 'cross_aisle']), code: z.string(), from: z.number(), to: z.number() })),
});

export const studyRoutes = [
  defineRoute({
    method: 'get',
    path: base,
    access: STUDY_ROLES,
    summary: "The site's studies, newest first; archived ones only with ?archived=include",
    query: StudyListQuery,
    response: z.array(StudySummary),
    handler: ({ deps, siteId, query }) => listStudies(deps, siteId, query.archived === 'include'),
  }),
  defineRoute({
    method: 'get',
    path: `${base}/layouts`,
    access: STUDY_ROLES,
    summary: 'Candidate layouts uploaded for what-if studies, newest first',
    response: z.array(CandidateLayout),
    handler: ({ deps, siteId }) => listCandidateLayouts(deps, siteId),
  }),
  defineRoute({
    method: 'post',
    path: `${base}/layouts`,
    access: STUDY_ROLES,
    upload: 'single-file',
    summary:
      'Upload a candidate layout for a what-if (a floor-plan workbook, multipart field "file", optional field "name"); checked like a plan upload: any problem → nothing saved, the problems row by row',
    response: CandidateLayoutUpload,
    handler: ({ deps, req, siteId, user }) => {
      const file = req.file;
      if (!file)
        throw new AppError('validation', 'validation_failed', 'Send the workbook in the multipart field "file"', [{ field: 'file', message: 'required' }]);
      const name = (req.body as { name?: unknown } | undefined)?.name;
      return uploadCandidateLayout(deps, siteId, user.id, {
        bytes: new Uint8Array(file.buffer),
        filename: file.originalname,
        ...(typeof name === 'string' ? { name: name.slice(0, 120) } : {}),
      });
    },
  }),
  defineRoute({
    method: 'post',
    path: base,
    access: STUDY_ROLES,
    summary: 'Save a study and run it in the background; poll it for progress',
    status: 202,
    body: StudyInputs,
    response: StudySummary,
    handler: ({ deps, siteId, user, body }) => createStudy(deps, siteId, user.id, body),
  }),
  defineRoute({
    method: 'get',
    path: `${base}/:id`,
    access: STUDY_ROLES,
    summary: 'A study: inputs, progress, then its results',
    response: StudyDetail,
    handler: ({ deps, siteId, params }) => getStudy(deps, siteId, idOf(params)),
  }),
  defineRoute({
    method: 'delete',
    path: `${base}/:id`,
    access: STUDY_ROLES,
    summary: 'Delete a study that is not running (reruns of it stay); audited',
    response: Ok,
    handler: ({ deps, siteId, user, params }) => deleteStudy(deps, siteId, user.id, idOf(params)),
  }),
  defineRoute({
    method: 'post',
    path: `${base}/:id/archive`,
    access: STUDY_ROLES,
    summary: 'Archive a study that is not running: hidden from the default list, kept whole',
    response: StudySummary,
    handler: ({ deps, siteId, user, params }) => archiveStudy(deps, siteId, user.id, idOf(params), true),
  }),
  defineRoute({
    method: 'post',
    path: `${base}/:id/unarchive`,
    access: STUDY_ROLES,
    summary: 'Bring an archived study back to the default list',
    response: StudySummary,
    handler: ({ deps, siteId, user, params }) => archiveStudy(deps, siteId, user.id, idOf(params), false),
  }),
  defineRoute({
    method: 'post',
    path: `${base}/:id/cancel`,
    access: STUDY_ROLES,
    summary: 'Stop a queued or running study (its worker is terminated)',
    response: StudySummary,
    handler: ({ deps, siteId, params }) => cancelStudy(deps, siteId, idOf(params)),
  }),
  defineRoute({
    method: 'post',
    path: `${base}/:id/rerun`,
    access: STUDY_ROLES,
    summary: 'Run a study again with the same inputs and seed, as a new study',
    status: 202,
    response: StudySummary,
    handler: ({ deps, siteId, user, params }) => rerunStudy(deps, siteId, user.id, idOf(params)),
  }),
  defineRoute({
    method: 'get',
    path: `${base}/:id/plans/:variant`,
    access: STUDY_ROLES,
    summary: 'The plan of a study variant (as it is, or a what-if) for the maps',
    response: StudyPlan,
    handler: ({ deps, siteId, params }) => studyPlan(deps.db, siteId, idOf(params), params.variant),
  }),
  defineRoute({
    method: 'get',
    path: `${base}/:id/route`,
    access: STUDY_ROLES,
    summary: "One trip's route by one method, for the side-by-side maps",
    query: StudyRouteQuery,
    response: StudyRoute,
    handler: ({ deps, siteId, params, query }) => studyRoute(deps.db, siteId, idOf(params), query),
  }),
  defineRoute({
    method: 'get',
    path: `${base}/:id/export.xlsx`,
    access: STUDY_ROLES,
    summary: 'The study as a workbook: inputs, then one sheet per table',
    handler: async ({ deps, siteId, params, res }) => {
      const study = await doneStudy(deps.db, siteId, idOf(params));
      return sendAttachment(res, studyWorkbook(study, await siteTimeZone(deps.db, siteId)), XLSX_TYPE, `study-${study.id}.xlsx`);
    },
  }),
];
