import { z } from 'zod';
import { Ok } from '../../shared/common';
import { CartProfile, CartProfileBody, CreateSiteBody, Site, UpdateSiteBody } from '../../shared/sites';
import { audit } from '../audit/audit';
import { AppError, notFound } from '../http/errors';
import { defineRoute } from '../http/route';
import { getCartProfile, getSite, listSitesOf, settingsColumns } from './sites.repository';

const mustSite = async (db: Parameters<typeof getSite>[0], id: number) => (await getSite(db, id)) ?? Promise.reject(notFound('Site'));

export const siteRoutes = [
  defineRoute({
    method: 'get', path: '/api/sites', access: 'signed-in', summary: 'Sites you work in (admins: all)',
    response: z.array(Site),
    handler: async ({ deps, user }) => {
      const rows = await listSitesOf(deps.db, user.id, user.role);
      return Promise.all(rows.map((r) => mustSite(deps.db, r.id)));
    },
  }),
  defineRoute({
    method: 'post', path: '/api/sites', access: ['admin'], summary: 'Create a site', status: 201,
    body: CreateSiteBody, response: Site,
    handler: async ({ deps, body, user }) => {
      if (await deps.db('sites').where({ code: body.code }).first()) throw new AppError('conflict', 'site_code_taken', `A site with code ${body.code} exists`);
      const [{ id }] = await deps.db('sites').insert({ code: body.code, name: body.name, timezone: body.timezone, created_at: new Date().toISOString() }, 'id');
      await audit(deps.db, { siteId: id!, userId: user.id, action: 'site.created', subject: body.code });
      return mustSite(deps.db, id!);
    },
  }),
  defineRoute({
    method: 'get', path: '/api/sites/:siteId', access: 'signed-in', summary: 'One site with its settings and cart profiles',
    response: Site,
    handler: ({ deps, siteId }) => mustSite(deps.db, siteId),
  }),
  defineRoute({
    method: 'patch', path: '/api/sites/:siteId', access: ['admin'], summary: 'Change a site and its settings',
    body: UpdateSiteBody, response: Site,
    handler: async ({ deps, body, siteId, user }) => {
      await mustSite(deps.db, siteId);
      const patch = { ...(body.name && { name: body.name }), ...(body.timezone && { timezone: body.timezone }), ...settingsColumns(body.settings ?? {}) };
      if (Object.keys(patch).length) await deps.db('sites').where({ id: siteId }).update(patch);
      await audit(deps.db, { siteId, userId: user.id, action: 'site.updated', detail: body });
      return mustSite(deps.db, siteId);
    },
  }),
  defineRoute({
    method: 'post', path: '/api/sites/:siteId/cart-profiles', access: ['admin'], summary: 'Add a cart profile', status: 201,
    body: CartProfileBody, response: CartProfile,
    handler: async ({ deps, body, siteId }) => {
      await mustSite(deps.db, siteId);
      const clash = await deps.db('cart_profiles').where({ site_id: siteId, name: body.name }).first<{ id: number; archived: number } | undefined>();
      if (clash && !clash.archived) throw new AppError('conflict', 'name_taken', `A cart profile named ${body.name} exists`);
      const cols = { name: body.name, totes: body.totes, max_kg: body.maxKg, max_litres: body.maxLitres, archived: false };
      let id: number;
      if (clash) {
        await deps.db('cart_profiles').where({ id: clash.id }).update(cols);
        id = clash.id;
      } else {
        [{ id }] = (await deps.db('cart_profiles').insert({ site_id: siteId, ...cols }, 'id')) as [{ id: number }];
      }
      return (await getCartProfile(deps.db, siteId, id))!;
    },
  }),
  defineRoute({
    method: 'put', path: '/api/sites/:siteId/cart-profiles/:id', access: ['admin'], summary: 'Change a cart profile',
    body: CartProfileBody, response: CartProfile,
    handler: async ({ deps, body, siteId, params }) => {
      const id = Number(params.id);
      if (!(await getCartProfile(deps.db, siteId, id))) throw notFound('Cart profile');
      await deps.db('cart_profiles').where({ id, site_id: siteId }).update({ name: body.name, totes: body.totes, max_kg: body.maxKg, max_litres: body.maxLitres });
      return (await getCartProfile(deps.db, siteId, id))!;
    },
  }),
  defineRoute({
    method: 'delete', path: '/api/sites/:siteId/cart-profiles/:id', access: ['admin'], summary: 'Remove a cart profile (waves that used it keep their figures)',
    response: Ok,
    handler: async ({ deps, siteId, params }) => {
      const n = await deps.db('cart_profiles').where({ id: Number(params.id), site_id: siteId, archived: false }).update({ archived: true });
      if (!n) throw notFound('Cart profile');
      return { ok: true as const };
    },
  }),
];
