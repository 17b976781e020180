import { createHash } from 'node:crypto';
import type { Knex } from 'knex';

export interface DbIntegrationToken {
  id: number;
  site_id: number;
  name: string;
  token_hash: string;
  prefix: string;
  created_by: number | null;
  created_at: string;
  revoked_at: string | null;
  last_used_at: string | null;
  expires_at: string | null;
}

export const sha256 = (s: string): string => createHash('sha256').update(s).digest('hex');

/** The site of a live (not revoked, not expired) token, or null. Tokens are stored only as SHA-256 hashes. */
export async function findActiveToken(db: Knex, token: string): Promise<{ id: number; siteId: number } | null> {
  if (token.length < 20 || token.length > 200) return null;
  const row = await db<DbIntegrationToken>('integration_tokens').where({ token_hash: sha256(token) }).whereNull('revoked_at').first();
  if (!row) return null;
  if (row.expires_at && new Date(row.expires_at).getTime() <= Date.now()) return null;
  await db('integration_tokens').where({ id: row.id }).update({ last_used_at: new Date().toISOString() });
  return { id: row.id, siteId: row.site_id };
}
