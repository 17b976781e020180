import { Health } from '../../shared/common';
import { defineRoute } from '../http/route';

export const systemRoutes = [
  defineRoute({
    method: 'get',
    path: '/api/health',
    access: 'public',
    summary: 'Liveness and database check',
    response: Health,
    handler: async ({ deps }) => {
      await deps.db.raw('select 1');
      return { status: 'ok' as const, db: 'ok' as const, version: deps.version };
    },
  }),
  defineRoute({
    method: 'get',
    path: '/api/openapi.json',
    access: 'public',
    summary: 'This API described as OpenAPI 3.1',
    // Built by createApp from the routes it mounted (server/app.ts), once per app.
    handler: ({ req }) => (req.app.locals.openApi as () => unknown)(),
  }),
];
