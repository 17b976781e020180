import { randomBytes } from 'node:crypto';
import type { z } from 'zod';
import type { CreateIntegrationTokenBody, IntegrationToken, NewIntegrationToken } from '../../shared/sites';
import { audit } from '../audit/audit';
import type { Q } from '../db/knex';
import { notFound } from '../http/errors';
import { getListedToken, insertToken, listTokens, revokeToken, sha256, type ListedToken } from './tokens.repository';

const toToken = (r: ListedToken): IntegrationToken => ({
  id: r.id,
  name: r.name,
  prefix: r.prefix,
  createdAt: r.created_at,
  revokedAt: r.revoked_at,
  lastUsedAt: r.last_used_at,
  expiresAt: r.expires_at,
  createdBy: r.created_by_name,
});

export async function siteTokens(db: Q, siteId: number): Promise<IntegrationToken[]> {
  return (await listTokens(db, siteId)).map(toToken);
}

/** A new token for the host system to push orders; its secret is returned once and stored only hashed. */
export async function createToken(
  db: Q,
  siteId: number,
  userId: number,
  body: z.infer<typeof CreateIntegrationTokenBody>,
): Promise<z.infer<typeof NewIntegrationToken>> {
  const token = `awi_${randomBytes(32).toString('base64url')}`;
  const id = await insertToken(db, {
    site_id: siteId,
    name: body.name,
    token_hash: sha256(token),
    prefix: token.slice(0, 10),
    created_by: userId,
    created_at: new Date().toISOString(),
    expires_at: body.expiresAt ? new Date(body.expiresAt).toISOString() : null,
  });
  await audit(db, { siteId, userId, action: 'integration-token.created', subject: body.name, detail: { expiresAt: body.expiresAt ?? null } });
  return { ...toToken((await getListedToken(db, id))!), token };
}

export async function revokeSiteToken(db: Q, siteId: number, userId: number, id: number): Promise<IntegrationToken> {
  if (!(await revokeToken(db, siteId, id))) throw notFound('Token');
  await audit(db, { siteId, userId, action: 'integration-token.revoked', subject: String(id) });
  return toToken((await getListedToken(db, id))!);
}
