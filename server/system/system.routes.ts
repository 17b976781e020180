import { Health } from '../../shared/common';
import { defineRoute } from '../http/route';
import { buildOpenApi } from './openapi';

let openApiCache: unknown = null;

export const systemRoutes = [
  defineRoute({
    method: 'get', path: '/api/health', access: 'public', summary: 'Liveness and database check', response: Health,
    handler: async ({ deps }) => {
      await deps.db.raw('select 1');
      return { status: 'ok' as const, db: 'ok' as const, version: deps.version };
    },
  }),
  defineRoute({
    method: 'get', path: '/api/openapi.json', access: 'public', summary: 'This API described as OpenAPI 3.1',
    handler: async ({ deps }) => {
      const { routeTable } = await import('../routes');
      openApiCache ??= buildOpenApi(routeTable, deps.version);
      return openApiCache;
    },
  }),
];
