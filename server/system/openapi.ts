import { OpenAPIRegistry, OpenApiGeneratorV31 } from '@asteasolutions/zod-to-openapi';
import type { AnyRoute } from '../http/route';
import { ErrorBody } from '../../shared/common';

/** The API description, generated from the same zod schemas the routes validate with. */
export function buildOpenApi(routes: readonly AnyRoute[], version: string): unknown {
  const registry = new OpenAPIRegistry();
  for (const r of routes) {
    const path = r.path.replace(/:(\w+)/g, '{$1}');
    const params = [...r.path.matchAll(/:(\w+)/g)].map((m) => m[1]!);
    const security = r.access === 'public' ? [] : r.access === 'integration' ? [{ bearer: [] }] : [{ session: [] }];
    registry.registerPath({
      method: r.method,
      path,
      summary: r.summary,
      description: `Access: ${r.access === 'public' || r.access === 'signed-in' || r.access === 'integration' ? r.access : r.access.join(', ')}`,
      security,
      ...(params.length ? { parameters: params.map((name) => ({ name, in: 'path' as const, required: true, schema: { type: 'string' as const } })) } : {}),
      request: {
        ...(r.body && !r.upload ? { body: { content: { 'application/json': { schema: r.body } } } } : {}),
        ...(r.upload
          ? { body: { content: { 'multipart/form-data': { schema: { type: 'object', properties: { file: { type: 'string', format: 'binary' } } } } } } }
          : {}),
        ...(r.query ? { query: r.query as never } : {}),
      },
      responses: {
        [String(r.status ?? 200)]: r.response ? { description: 'OK', content: { 'application/json': { schema: r.response } } } : { description: 'OK' },
        default: { description: 'Error', content: { 'application/json': { schema: ErrorBody } } },
      },
    });
  }
  registry.registerComponent('securitySchemes', 'session', { type: 'apiKey', in: 'cookie', name: 'aw_session' });
  registry.registerComponent('securitySchemes', 'bearer', { type: 'http', scheme: 'bearer' });
  return new OpenApiGeneratorV31(registry.definitions).generateDocument({
    openapi: '3.1.0',
    info: { title: 'Aislewright API', version, description: 'Pick routing and batching for manual picker-to-parts warehouses.' },
  });
}
