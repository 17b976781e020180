import { randomBytes } from 'node:crypto';
import type { Q } from '../db/knex';
import type { Role } from '../../shared/common';
import { SESSION_MAX_S } from '../http/session';
import { siteIdsOf } from '../users/users.repository';

/** Starts a server-side session; sessions past the shift limit (anyone's, revoked or not) are removed. */
export async function createSession(db: Q, userId: number, authTime: number, device: string | null): Promise<string> {
  const id = randomBytes(18).toString('base64url');
  await db('sessions')
    .where('auth_time', '<', authTime - SESSION_MAX_S)
    .delete();
  await db('sessions').insert({ id, user_id: userId, auth_time: authTime, device, created_at: new Date().toISOString(), revoked_at: null });
  return id;
}

export interface LiveSession {
  sessionId: string;
  id: number;
  name: string;
  role: Role;
  tokenVersion: number;
  siteIds: number[];
}

/**
 * The session's user, when the session exists, is not revoked and the user is active. One indexed
 * lookup by primary key joined to the user (the same round trips as reading the user alone), plus
 * the user's sites.
 */
export async function loadLiveSession(db: Q, sessionId: string, userId: number): Promise<LiveSession | null> {
  const row = await db('sessions')
    .join('users', 'users.id', 'sessions.user_id')
    .where('sessions.id', sessionId)
    .first<{ user_id: number; revoked_at: string | null; name: string; role: Role; active: number | boolean; token_version: number } | undefined>(
      'sessions.user_id',
      'sessions.revoked_at',
      'users.name',
      'users.role',
      'users.active',
      'users.token_version',
    );
  if (!row || row.revoked_at !== null || row.user_id !== userId || !row.active) return null;
  return { sessionId, id: row.user_id, name: row.name, role: row.role, tokenVersion: row.token_version, siteIds: await siteIdsOf(db, userId) };
}

export async function revokeSession(db: Q, sessionId: string): Promise<number> {
  return db('sessions').where({ id: sessionId }).whereNull('revoked_at').update({ revoked_at: new Date().toISOString() });
}

/** Ends every live session of a user; returns how many were live. */
export async function revokeAllSessions(db: Q, userId: number): Promise<number> {
  return db('sessions').where({ user_id: userId }).whereNull('revoked_at').update({ revoked_at: new Date().toISOString() });
}
