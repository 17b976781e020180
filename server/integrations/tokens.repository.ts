import { createHash } from 'node:crypto';
import type { Knex } from 'knex';
import type { Q } from '../db/knex';

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
  const row = await db<DbIntegrationToken>('integration_tokens')
    .where({ token_hash: sha256(token) })
    .whereNull('revoked_at')
    .first();
  if (!row) return null;
  if (row.expires_at && new Date(row.expires_at).getTime() <= Date.now()) return null;
  await db('integration_tokens').where({ id: row.id }).update({ last_used_at: new Date().toISOString() });
  return { id: row.id, siteId: row.site_id };
}

/** A token row with the name of who created it, as the token list shows it. */
export type ListedToken = DbIntegrationToken & { created_by_name: string | null };

const listed = (db: Q) =>
  db('integration_tokens as t').leftJoin('users as u', 'u.id', 't.created_by').select<ListedToken[]>('t.*', 'u.name as created_by_name');

export async function listTokens(db: Q, siteId: number): Promise<ListedToken[]> {
  return listed(db).where('t.site_id', siteId).orderBy('t.id', 'desc');
}

export async function getListedToken(db: Q, id: number): Promise<ListedToken | undefined> {
  return listed(db).where('t.id', id).first();
}

export async function insertToken(db: Q, row: Omit<DbIntegrationToken, 'id' | 'revoked_at' | 'last_used_at'>): Promise<number> {
  const [r] = await db('integration_tokens').insert(row, 'id');
  return (r as { id: number }).id;
}

/** Revokes a live token of the site; false when there is none. */
export async function revokeToken(db: Q, siteId: number, id: number): Promise<boolean> {
  return (await db('integration_tokens').where({ id, site_id: siteId }).whereNull('revoked_at').update({ revoked_at: new Date().toISOString() })) > 0;
}
