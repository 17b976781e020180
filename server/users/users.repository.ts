import type { Q } from '../db/knex';
import type { Role } from '../../shared/common';
import type { UserRow } from '../../shared/users';
import { normaliseBadge } from '../../shared/auth';

export interface DbUserRow {
  id: number;
  name: string;
  email: string | null;
  badge: string | null;
  role: Role;
  password_hash: string | null;
  pin_hash: string | null;
  active: number;
  token_version: number;
  created_at: string;
}

export async function siteIdsOf(db: Q, userId: number): Promise<number[]> {
  const rows = await db('user_sites').where({ user_id: userId }).orderBy('site_id').select<{ site_id: number }[]>('site_id');
  return rows.map((r) => r.site_id);
}

export async function findUserByEmail(db: Q, email: string): Promise<DbUserRow | undefined> {
  return db<DbUserRow>('users').where({ email }).first();
}

/** Badge codes are stored normalised (upper-case, trimmed), so any spelling of the code finds its user. */
export async function findUserByBadge(db: Q, badge: string): Promise<DbUserRow | undefined> {
  return db<DbUserRow>('users')
    .where({ badge: normaliseBadge(badge) })
    .first();
}

export async function findUserById(db: Q, id: number): Promise<DbUserRow | undefined> {
  return db<DbUserRow>('users').where({ id }).first();
}

export async function insertUser(db: Q, row: Omit<DbUserRow, 'id' | 'active' | 'token_version'>, siteIds: number[]): Promise<number> {
  const [{ id }] = await db('users').insert({ ...row, badge: row.badge === null ? null : normaliseBadge(row.badge) }, 'id');
  if (siteIds.length) await db('user_sites').insert(siteIds.map((site_id) => ({ user_id: id, site_id })));
  return id!;
}

export async function setUserSites(db: Q, userId: number, siteIds: number[]): Promise<void> {
  await db('user_sites').where({ user_id: userId }).delete();
  if (siteIds.length) await db('user_sites').insert(siteIds.map((site_id) => ({ user_id: userId, site_id })));
}

export async function updateUser(db: Q, id: number, patch: Partial<Omit<DbUserRow, 'id'>>): Promise<void> {
  // An empty patch (only sites changed) has nothing to write here; Knex refuses an empty update.
  if (Object.keys(patch).length === 0) return;
  await db('users').where({ id }).update(patch);
}

export async function bumpTokenVersion(db: Q, id: number): Promise<void> {
  await db('users').where({ id }).increment('token_version', 1);
}

export async function listUsers(db: Q): Promise<UserRow[]> {
  const users = await db<DbUserRow>('users').orderBy([{ column: 'role' }, { column: 'name' }]);
  const links = await db('user_sites').select<{ user_id: number; site_id: number }[]>('user_id', 'site_id');
  const byUser = new Map<number, number[]>();
  for (const l of links) byUser.set(l.user_id, [...(byUser.get(l.user_id) ?? []), l.site_id]);
  return users.map((u) => toUserRow(u, byUser.get(u.id) ?? []));
}

export function toUserRow(u: DbUserRow, siteIds: number[]): UserRow {
  return { id: u.id, name: u.name, email: u.email, role: u.role, badge: u.badge, active: !!u.active, siteIds, createdAt: u.created_at };
}

export async function siteMembersWithRole(db: Q, siteId: number, role: Role): Promise<{ id: number; name: string; email: string | null }[]> {
  return db('users')
    .join('user_sites', 'user_sites.user_id', 'users.id')
    .where({ 'user_sites.site_id': siteId, 'users.role': role, 'users.active': true })
    .select('users.id', 'users.name', 'users.email');
}

/** Of these site ids, those that exist. */
export async function existingSiteIds(db: Q, siteIds: number[]): Promise<number[]> {
  return db('sites').whereIn('id', siteIds).pluck('id');
}

export interface DbInviteRow {
  id: number;
  email: string;
  role: Role;
  site_ids: string;
  token_hash: string;
  expires_at: string;
  accepted_at: string | null;
  invited_by: number | null;
  created_at: string;
}

/** The latest invitations, newest first. */
export async function latestInvites(db: Q, limit: number): Promise<DbInviteRow[]> {
  return db<DbInviteRow>('invites').orderBy('id', 'desc').limit(limit);
}

export async function insertInvite(db: Q, row: Omit<DbInviteRow, 'id' | 'accepted_at'>): Promise<number> {
  const [{ id }] = await db('invites').insert(row, 'id');
  return id as number;
}

export async function inviteByTokenHash(db: Q, tokenHash: string): Promise<DbInviteRow | undefined> {
  return db<DbInviteRow>('invites').where({ token_hash: tokenHash }).first();
}

/** Marks the invitation accepted; false when another request accepted it first. */
export async function markInviteAccepted(db: Q, id: number, at: string): Promise<boolean> {
  return (await db('invites').where({ id }).whereNull('accepted_at').update({ accepted_at: at })) === 1;
}
