import { z } from 'zod';
import { CreateIntegrationTokenBody, IntegrationToken, NewIntegrationToken } from '../../shared/sites';
import { pathId } from '../http/path-id';
import { defineRoute } from '../http/route';
import { createToken, revokeSiteToken, siteTokens } from './tokens.service';

export const tokenRoutes = [
  defineRoute({
    method: 'get',
    path: '/api/sites/:siteId/integration-tokens',
    access: ['admin'],
    summary: "A site's integration tokens (orders only)",
    response: z.array(IntegrationToken),
    handler: ({ deps, siteId }) => siteTokens(deps.db, siteId),
  }),
  defineRoute({
    method: 'post',
    path: '/api/sites/:siteId/integration-tokens',
    access: ['admin'],
    summary: 'Create a token for the host system to push orders; shown once',
    status: 201,
    body: CreateIntegrationTokenBody,
    response: NewIntegrationToken,
    handler: ({ deps, siteId, body, user }) => createToken(deps.db, siteId, user.id, body),
  }),
  defineRoute({
    method: 'delete',
    path: '/api/sites/:siteId/integration-tokens/:id',
    access: ['admin'],
    summary: 'Revoke a token (refused from then on)',
    response: IntegrationToken,
    handler: ({ deps, siteId, params, user }) => revokeSiteToken(deps.db, siteId, user.id, pathId(params.id, 'Token')),
  }),
];
