import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import express from 'express';
import { routeTable } from '../../server/routes';
import { createApp } from '../../server/app';
import { defineRoute, type Access, type AnyRoute } from '../../server/http/route';
import { ROLES, type Role } from '../../shared/common';
import { csrf, makeDeps, makeTestApp, type TestApp } from '../helpers/app';

/** Every [method, path] Express actually mounted, read from its router stack. */
function mountedRoutes(app: express.Express): string[] {
  const out: string[] = [];
  const stack = (app as unknown as { router: { stack: { route?: { path: string; methods: Record<string, boolean> } }[] } }).router.stack;
  for (const layer of stack) {
    if (!layer.route) continue;
    for (const m of Object.keys(layer.route.methods)) out.push(`${m.toUpperCase()} ${layer.route.path}`);
  }
  return out;
}

const key = (r: AnyRoute) => `${r.method.toUpperCase()} ${r.path}`;

/** The rule the table promises for a role (site membership aside: demo users belong to the site). */
function expectedFor(access: Access, role: Role | 'anon'): 'allowed' | 401 | 403 {
  if (access === 'public') return 'allowed';
  if (access === 'integration') return 401;
  if (role === 'anon') return 401;
  if (access === 'signed-in') return 'allowed';
  return access.includes(role) ? 'allowed' : 403;
}

describe('the route table', () => {
  it('lists every route Express mounts, and each has an access rule', async () => {
    const app = createApp(await makeDeps());
    const table = new Set(routeTable.map(key));
    const mounted = mountedRoutes(app).filter((r) => r.split(' ')[1]!.startsWith('/api'));
    expect(mounted.length).toBeGreaterThan(10);
    for (const r of mounted) expect(table.has(r), `${r} is mounted but has no access rule in server/routes.ts`).toBe(true);
    for (const r of routeTable) expect(r.access, key(r)).toBeDefined();
  });

  it('fails when a route is mounted outside the table', async () => {
    // Regression guard for the guard itself: a stray app.get must be seen.
    const app = createApp(await makeDeps());
    app.get('/api/sneaky', (_req, res) => void res.json({}));
    const table = new Set(routeTable.map(key));
    const strays = mountedRoutes(app).filter((r) => r.startsWith('GET /api') && !table.has(r));
    expect(strays).toEqual(['GET /api/sneaky']);
  });

  it('has no duplicate method and path', () => {
    const keys = routeTable.map(key);
    expect(new Set(keys).size).toBe(keys.length);
  });

  it('refuses a route defined without an access rule at type level', () => {
    // @ts-expect-error access is required
    const r = defineRoute({ method: 'get', path: '/api/x', summary: 'x', handler: () => 1 });
    expect(r.access).toBeUndefined();
  });
});

describe('every route as every role', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await makeTestApp();
  });
  afterAll(() => t.close());

  const fill = (path: string, siteId: number) =>
    path.replace(':siteId', String(siteId)).replace(/:(\w+)/g, (_m, name: string) => (name === 'token' ? 'x'.repeat(30) : '999999'));

  for (const route of routeTable) {
    for (const role of [...ROLES, 'anon'] as const) {
      it(`${key(route)} as ${role}`, async () => {
        const agent = role === 'anon' ? t.anon : t.as[role];
        const path = fill(route.path, t.siteId);
        // Sign-out would end the shared agents' sessions; its rule is public and needs no call here.
        if (route.path === '/api/auth/sign-out') return expect(route.access).toBe('public');
        // Signing out everywhere would too: only the anonymous call is made.
        if (route.path === '/api/auth/sign-out-everywhere' && role !== 'anon') return expect(route.access).toBe('signed-in');
        const res = await agent[route.method](path).set(csrf).send({});
        const want = expectedFor(route.access, role);
        const code = (res.body as { error?: { code?: string } }).error?.code;
        if (want === 'allowed') {
          // Allowed means the access layer let it through: whatever the handler then answers
          // (400 for the empty body, 404 for the made-up id) is not 401 'unauthenticated' or 403.
          expect(res.status === 403 || code === 'unauthenticated' || code === 'integration_token_required', `${res.status} ${JSON.stringify(res.body)}`).toBe(
            false,
          );
        } else {
          expect(res.status, JSON.stringify(res.body)).toBe(want);
        }
      });
    }
  }
});
