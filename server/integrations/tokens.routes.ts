import { randomBytes } from 'node:crypto';
import type { Knex } from 'knex';
import { z } from 'zod';
import { CreateIntegrationTokenBody, IntegrationToken, NewIntegrationToken } from '../../shared/sites';
import { audit } from '../audit/audit';
import { notFound } from '../http/errors';
import { defineRoute } from '../http/route';
import { sha256, type DbIntegrationToken } from './tokens.repository';

type Listed = DbIntegrationToken & { created_by_name: string | null };
const toToken = (r: Listed): IntegrationToken => ({
  id: r.id, name: r.name, prefix: r.prefix, createdAt: r.created_at, revokedAt: r.revoked_at, lastUsedAt: r.last_used_at, expiresAt: r.expires_at, createdBy: r.created_by_name,
});
const tokens = (db: Knex) => db('integration_tokens as t').leftJoin('users as u', 'u.id', 't.created_by').select<Listed[]>('t.*', 'u.name as created_by_name');

export const tokenRoutes = [
  defineRoute({
    method: 'get', path: '/api/sites/:siteId/integration-tokens', access: ['admin'], summary: "A site's integration tokens (orders only)",
    response: z.array(IntegrationToken),
    handler: async ({ deps, siteId }) => (await tokens(deps.db).where('t.site_id', siteId).orderBy('t.id', 'desc')).map(toToken),
  }),
  defineRoute({
    method: 'post', path: '/api/sites/:siteId/integration-tokens', access: ['admin'], summary: 'Create a token for the host system to push orders; shown once', status: 201,
    body: CreateIntegrationTokenBody, response: NewIntegrationToken,
    handler: async ({ deps, siteId, body, user }) => {
      const token = `awi_${randomBytes(32).toString('base64url')}`;
      const [{ id }] = await deps.db('integration_tokens').insert({
        site_id: siteId, name: body.name, token_hash: sha256(token), prefix: token.slice(0, 10), created_by: user.id, created_at: new Date().toISOString(),
        expires_at: body.expiresAt ? new Date(body.expiresAt).toISOString() : null,
      }, 'id');
      await audit(deps.db, { siteId, userId: user.id, action: 'integration-token.created', subject: body.name, detail: { expiresAt: body.expiresAt ?? null } });
      const row = (await tokens(deps.db).where('t.id', id!).first())!;
      return { ...toToken(row), token };
    },
  }),
  defineRoute({
    method: 'delete', path: '/api/sites/:siteId/integration-tokens/:id', access: ['admin'], summary: 'Revoke a token (refused from then on)',
    response: IntegrationToken,
    handler: async ({ deps, siteId, params, user }) => {
      const n = await deps.db('integration_tokens').where({ id: Number(params.id), site_id: siteId }).whereNull('revoked_at').update({ revoked_at: new Date().toISOString() });
      if (!n) throw notFound('Token');
      await audit(deps.db, { siteId, userId: user.id, action: 'integration-token.revoked', subject: params.id });
      return toToken((await tokens(deps.db).where('t.id', Number(params.id)).first())!);
    },
  }),
];
