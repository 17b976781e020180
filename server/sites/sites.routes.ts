import { z } from 'zod';
import { Ok } from '../../shared/common';
import { CartProfile, CartProfileBody, CreateSiteBody, Site, UpdateSiteBody } from '../../shared/sites';
import { pathId } from '../http/path-id';
import { defineRoute } from '../http/route';
import { addCartProfile, changeCartProfile, createSite, mustSite, removeCartProfile, sitesOf, updateSite } from './sites.service';

export const siteRoutes = [
  defineRoute({
    method: 'get',
    path: '/api/sites',
    access: 'signed-in',
    summary: 'Sites you work in (admins: all)',
    response: z.array(Site),
    handler: ({ deps, user }) => sitesOf(deps.db, user.id, user.role),
  }),
  defineRoute({
    method: 'post',
    path: '/api/sites',
    access: ['admin'],
    summary: 'Create a site',
    status: 201,
    body: CreateSiteBody,
    response: Site,
    handler: ({ deps, body, user }) => createSite(deps.db, user.id, body),
  }),
  defineRoute({
    method: 'get',
    path: '/api/sites/:siteId',
    access: 'signed-in',
    summary: 'One site with its settings and cart profiles',
    response: Site,
    handler: ({ deps, siteId }) => mustSite(deps.db, siteId),
  }),
  defineRoute({
    method: 'patch',
    path: '/api/sites/:siteId',
    access: ['admin'],
    summary: 'Change a site and its settings',
    body: UpdateSiteBody,
    response: Site,
    handler: ({ deps, body, siteId, user }) => updateSite(deps.db, siteId, user.id, body),
  }),
  defineRoute({
    method: 'post',
    path: '/api/sites/:siteId/cart-profiles',
    access: ['admin'],
    summary: 'Add a cart profile',
    status: 201,
    body: CartProfileBody,
    response: CartProfile,
    handler: ({ deps, body, siteId }) => addCartProfile(deps.db, siteId, body),
  }),
  defineRoute({
    method: 'put',
    path: '/api/sites/:siteId/cart-profiles/:id',
    access: ['admin'],
    summary: 'Change a cart profile',
    body: CartProfileBody,
    response: CartProfile,
    handler: ({ deps, body, siteId, params }) => changeCartProfile(deps.db, siteId, pathId(params.id, 'Cart profile'), body),
  }),
  defineRoute({
    method: 'delete',
    path: '/api/sites/:siteId/cart-profiles/:id',
    access: ['admin'],
    summary: 'Remove a cart profile (waves that used it keep their figures)',
    response: Ok,
    handler: async ({ deps, siteId, params }) => {
      await removeCartProfile(deps.db, siteId, pathId(params.id, 'Cart profile'));
      return { ok: true as const };
    },
  }),
];
