import { PruneCounts, RetentionBody, RetentionState } from '../../shared/data-safety';
import { z } from 'zod';
import { defineRoute } from '../http/route';
import { pruneNow, retentionState, setRetention } from './retention.service';

export const retentionRoutes = [
  defineRoute({
    method: 'get',
    path: '/api/admin/retention',
    access: ['admin'],
    summary: 'How long data is kept, the defaults, and the last pruning run',
    response: RetentionState,
    handler: ({ deps }) => retentionState(deps.db),
  }),
  defineRoute({
    method: 'put',
    path: '/api/admin/retention',
    access: ['admin'],
    summary: 'Change how long data is kept (days)',
    body: RetentionBody,
    response: RetentionState,
    handler: async ({ deps, body, user }) => {
      await setRetention(deps.db, body, user.id);
      return retentionState(deps.db);
    },
  }),
  defineRoute({
    method: 'post',
    path: '/api/admin/retention/prune',
    access: ['admin'],
    summary: 'Prune now by the retention settings (audited)',
    body: z.strictObject({}),
    response: PruneCounts,
    handler: ({ deps, user }) => pruneNow(deps.db, { userId: user.id }),
  }),
];
