import { z } from 'zod';
import { ReleaseBody, TripDetail, WaveActuals, WaveDetail, WaveJob, WavePreviewBody, WaveStatus, WaveSummary } from '../../shared/waves';
import { notFound } from '../http/errors';
import { pathId } from '../http/path-id';
import { defineRoute, officeRead } from '../http/route';
import { getPreviewJob } from './preview-jobs';
import { buildWaveReport } from '../picking/report';
import { cancelWave, listWaves, releaseWave, startPreview, tripDetail, waveDetail } from './waves.service';

const PLANNERS = ['supervisor', 'admin'] as const;

export const waveRoutes = [
  defineRoute({
    method: 'post',
    path: '/api/sites/:siteId/wave-previews',
    access: PLANNERS,
    summary: 'Plan a wave preview in the background; poll the job',
    status: 202,
    body: WavePreviewBody,
    response: WaveJob,
    handler: ({ deps, siteId, user, body }) => startPreview(deps, siteId, user.id, body),
  }),
  defineRoute({
    method: 'get',
    path: '/api/sites/:siteId/wave-previews/:id',
    access: PLANNERS,
    summary: 'A wave preview job: progress, then the preview',
    response: WaveJob,
    handler: async ({ deps, siteId, params }) => (await getPreviewJob(deps, siteId, params.id)) ?? Promise.reject(notFound('Preview')),
  }),
  defineRoute({
    method: 'post',
    path: '/api/sites/:siteId/waves',
    access: PLANNERS,
    summary: 'Release a previewed wave (idempotent by releaseKey)',
    status: 201,
    body: ReleaseBody,
    response: WaveDetail,
    handler: ({ deps, siteId, user, body }) => releaseWave(deps, siteId, user.id, body.previewId, body.releaseKey, body.name),
  }),
  officeRead({
    path: '/api/sites/:siteId/waves',
    summary: 'Released waves, newest first',
    query: z.strictObject({ status: WaveStatus.optional() }),
    response: z.array(WaveSummary),
    handler: ({ deps, siteId, query }) => listWaves(deps.db, siteId, query.status),
  }),
  officeRead({
    path: '/api/sites/:siteId/waves/:id',
    summary: 'A wave with its trips',
    response: WaveDetail,
    handler: ({ deps, siteId, params }) => waveDetail(deps.db, siteId, pathId(params.id, 'Wave')),
  }),
  officeRead({
    path: '/api/sites/:siteId/waves/:id/actuals',
    summary: 'Planned against actual per trip: walked metres, minutes, shorts (the wave report as JSON)',
    response: WaveActuals,
    handler: async ({ deps, siteId, params }) => {
      const waveId = pathId(params.id, 'Wave');
      await waveDetail(deps.db, siteId, waveId); // 404 for another site's or an unknown wave
      const report = await buildWaveReport(deps.db, waveId);
      // A trip nobody has started has walked nothing yet: no figure, rather than "0 m".
      return {
        rows: report.rows.map((r) => ({
          trip: r.trip,
          status: r.status,
          lines: r.lines,
          picked: r.picked,
          shorts: r.shorts,
          plannedMetres: r.plannedMetres,
          walkedMetres: r.status === 'released' || r.status === 'assigned' ? null : r.walkedMetres,
          estMinutes: r.estMinutes,
          minutes: r.minutes,
        })),
      };
    },
  }),
  defineRoute({
    method: 'post',
    path: '/api/sites/:siteId/waves/:id/cancel',
    access: PLANNERS,
    summary: 'Cancel a wave nobody has started; its orders return to the open pool',
    response: WaveDetail,
    handler: ({ deps, siteId, user, params }) => cancelWave(deps, siteId, user.id, pathId(params.id, 'Wave')),
  }),
  officeRead({
    path: '/api/sites/:siteId/trips/:id',
    summary: 'A trip with numbered stops, pick lines and route (print view)',
    response: TripDetail,
    handler: ({ deps, siteId, params }) => tripDetail(deps.db, siteId, pathId(params.id, 'Trip')),
  }),
];
