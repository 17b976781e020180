import { z } from 'zod';
import { AutoAssignResult, SignedInPicker } from '../../shared/assign';
import { pathId } from '../http/path-id';
import { defineRoute } from '../http/route';
import { autoAssignWave, signedInPickers } from './assign';

const SUPERVISE = ['supervisor', 'admin'] as const;

export const assignRoutes = [
  defineRoute({
    method: 'get',
    path: '/api/sites/:siteId/pickers/signed-in',
    access: SUPERVISE,
    summary: 'Pickers of the site signed in right now (a live session), with the trip each holds',
    response: z.array(SignedInPicker),
    handler: ({ deps, siteId }) => signedInPickers(deps.db, siteId),
  }),
  defineRoute({
    method: 'post',
    path: '/api/sites/:siteId/waves/:waveId/auto-assign',
    access: SUPERVISE,
    summary: "Give each free signed-in picker the wave's next waiting trip (longest-free first); audited per trip",
    response: AutoAssignResult,
    handler: ({ deps, siteId, user, req, params }) => {
      const waveId = pathId(params.waveId, 'Wave');
      const device = (req.get('user-agent') ?? '').slice(0, 200) || null;
      return autoAssignWave(deps.db, { id: user.id, name: user.name, role: user.role, siteIds: user.siteIds, device }, siteId, waveId);
    },
  }),
];
