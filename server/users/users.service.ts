import type { Knex } from 'knex';
import type { CreatePickerBody, InviteBody, InviteRow, SessionsEnded, UpdateUserBody, UserRow } from '../../shared/users';
import { revokeAllSessions } from '../auth/sessions.repository';
import { audit } from '../audit/audit';
import { newToken } from '../auth/tokens';
import type { Deps } from '../deps';
import { uniqueOrConflict } from '../db/knex';
import { AppError, notFound } from '../http/errors';
import {
  bumpTokenVersion,
  findUserByBadge,
  findUserByEmail,
  findUserById,
  existingSiteIds,
  insertInvite,
  insertUser,
  latestInvites,
  setUserSites,
  siteIdsOf,
  toUserRow,
  updateUser,
} from './users.repository';

const INVITE_TTL_MS = 72 * 60 * 60_000;

async function checkSites(db: Knex, siteIds: number[]): Promise<void> {
  const found = await existingSiteIds(db, siteIds);
  const missing = siteIds.filter((id) => !found.includes(id));
  if (missing.length)
    throw new AppError('validation', 'validation_failed', `Unknown site ${missing.join(', ')}`, [{ field: 'siteIds', message: 'unknown site' }]);
}

export async function listInvites(db: Knex): Promise<InviteRow[]> {
  const rows = await latestInvites(db, 200);
  return rows.map((r) => ({
    id: r.id,
    email: r.email,
    role: r.role,
    expiresAt: r.expires_at,
    acceptedAt: r.accepted_at,
    createdAt: r.created_at,
  }));
}

export async function inviteUser(deps: Deps, adminId: number, body: InviteBody): Promise<InviteRow> {
  await checkSites(deps.db, body.siteIds);
  if (await findUserByEmail(deps.db, body.email)) throw new AppError('conflict', 'email_taken', 'A user with this e-mail already exists');
  const { token, hash } = newToken();
  const now = Date.now();
  const expiresAt = new Date(now + INVITE_TTL_MS).toISOString();
  const id = await insertInvite(deps.db, {
    email: body.email,
    role: body.role,
    site_ids: JSON.stringify(body.siteIds),
    token_hash: hash,
    expires_at: expiresAt,
    invited_by: adminId,
    created_at: new Date(now).toISOString(),
  });
  const link = `${deps.config.publicUrl}/accept-invite?token=${token}`;
  await deps.mailer.send({
    to: body.email,
    subject: 'You are invited to Aislewright',
    text: `Hello,\n\nYou have been invited to Aislewright as ${body.role}. Open this link within 72 hours to choose your name and password:\n\n${link}\n\nThe link works once.\n`,
    link: { tokenHash: hash, expiresAt },
  });
  await audit(deps.db, { userId: adminId, action: 'user.invited', subject: body.email, detail: { role: body.role, siteIds: body.siteIds } });
  return (await listInvites(deps.db)).find((i) => i.id === id)!;
}

export async function createPicker(deps: Deps, adminId: number, body: CreatePickerBody): Promise<UserRow> {
  await checkSites(deps.db, body.siteIds);
  const badgeTaken = () => new AppError('conflict', 'badge_taken', `Badge ${body.badge} is already in use`, [{ field: 'badge', message: 'already in use' }]);
  if (await findUserByBadge(deps.db, body.badge)) throw badgeTaken();
  const pinHash = await deps.hasher.hash(body.pin);
  // The user and its sites in one transaction; a parallel request that took the badge since the
  // check above hits the UNIQUE index: the same 409 as the check.
  const id = await uniqueOrConflict(
    deps.db.transaction((trx) =>
      insertUser(
        trx,
        { name: body.name, email: null, badge: body.badge, role: 'picker', password_hash: null, pin_hash: pinHash, created_at: new Date().toISOString() },
        body.siteIds,
      ),
    ),
    badgeTaken,
  );
  await audit(deps.db, { userId: adminId, action: 'picker.created', subject: body.badge });
  return toUserRow((await findUserById(deps.db, id))!, body.siteIds);
}

export async function updateUserAsAdmin(deps: Deps, adminId: number, id: number, body: UpdateUserBody): Promise<UserRow> {
  const user = await findUserById(deps.db, id);
  if (!user) throw notFound('User');
  if (id === adminId && (body.active === false || (body.role && body.role !== 'admin'))) {
    throw new AppError('conflict', 'self_lockout', 'You cannot deactivate yourself or remove your own admin role');
  }
  if (body.role === 'picker' && !user.badge)
    throw new AppError('validation', 'validation_failed', 'A picker needs a badge; create pickers with badge and PIN', [
      { field: 'role', message: 'needs a badge' },
    ]);
  if (body.role && body.role !== 'picker' && !user.email)
    throw new AppError('validation', 'validation_failed', 'This role signs in by e-mail; invite the person instead', [
      { field: 'role', message: 'needs an e-mail' },
    ]);
  if (body.siteIds) await checkSites(deps.db, body.siteIds);
  await deps.db.transaction(async (trx) => {
    await updateUser(trx, id, {
      ...(body.name && { name: body.name }),
      ...(body.role && { role: body.role }),
      ...(body.active !== undefined && { active: body.active ? 1 : 0 }),
    });
    if (body.siteIds) await setUserSites(trx, id, body.siteIds);
    // Sessions end at once on deactivation or a role change.
    if (body.active === false || (body.role && body.role !== user.role)) await bumpTokenVersion(trx, id);
  });
  await audit(deps.db, { userId: adminId, action: 'user.updated', subject: String(id), detail: body });
  return toUserRow((await findUserById(deps.db, id))!, await siteIdsOf(deps.db, id));
}

export async function resetPin(deps: Deps, adminId: number, id: number, pin: string): Promise<void> {
  const user = await findUserById(deps.db, id);
  if (!user || user.role !== 'picker') throw notFound('Picker');
  const pinHash = await deps.hasher.hash(pin);
  await updateUser(deps.db, id, { pin_hash: pinHash });
  await bumpTokenVersion(deps.db, id);
  await audit(deps.db, { userId: adminId, action: 'picker.pin-reset', subject: user.badge });
}

export async function endSessionsOf(deps: Deps, adminId: number, id: number): Promise<SessionsEnded> {
  const user = await findUserById(deps.db, id);
  if (!user) throw notFound('User');
  const ended = await revokeAllSessions(deps.db, id);
  await audit(deps.db, { userId: adminId, action: 'user.sessions-ended', subject: String(id), detail: { ended } });
  return { ended };
}
