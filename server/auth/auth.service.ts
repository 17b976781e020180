import type { Knex } from 'knex';
import { isIanaTimeZone } from '../../shared/time-zone';
import { normaliseBadge, type Me, type InviteInfo } from '../../shared/auth';
import type { Deps } from '../deps';
import { AppError } from '../http/errors';
import { SESSION_MAX_S } from '../http/session';
import { listSitesOf } from '../sites/sites.repository';
import {
  bumpTokenVersion,
  findUserByBadge,
  findUserByEmail,
  findUserById,
  insertUser,
  inviteByTokenHash,
  markInviteAccepted,
  updateUser,
  type DbInviteRow,
  type DbUserRow,
} from '../users/users.repository';
import { uniqueOrConflict } from '../db/knex';
import { closeOpenResets, insertPasswordReset, markResetUsed, passwordResetByTokenHash } from './password-resets.repository';
import { audit } from '../audit/audit';
import { newToken, sha256 } from './tokens';
import { closeOutboxLinks } from '../mail/mailer';

const RESET_TTL_MS = 60 * 60_000;

const invalidCredentials = () => new AppError('unauthenticated', 'invalid_credentials', 'Those sign-in details are not right');

function tooMany(waitMs: number): AppError {
  const s = Math.ceil(waitMs / 1000);
  return new AppError('rate_limited', 'too_many_attempts', `Too many failed attempts; try again in ${s} s`, { retryAfterSeconds: s });
}

export async function meOf(db: Knex, user: DbUserRow, authTime: number): Promise<Me> {
  const sites = await listSitesOf(db, user.id, user.role);
  return {
    id: user.id,
    name: user.name,
    email: user.email,
    role: user.role,
    badge: user.badge,
    sites: sites.map((s) => ({ id: s.id, code: s.code, name: s.name, timezone: isIanaTimeZone(s.timezone) ? s.timezone : 'UTC' })),
    sessionEndsAt: new Date((authTime + SESSION_MAX_S) * 1000).toISOString(),
  };
}

/** Sign-in attempts per account and address together, per 15 minutes (successes included). */
export const PAIR_LIMIT = { limit: 60, windowMs: 15 * 60_000 } as const;
/** Password-reset mails per e-mail address per hour. */
export const RESET_MAIL_LIMIT = { limit: 3, windowMs: 60 * 60_000 } as const;

/**
 * Checks a secret against the user's hash. The attempt is counted before the check (in the
 * database, atomically), so parallel guesses cost the same as serial ones. Unknown users and users
 * without that kind of secret cost the same verify and get the same answer.
 * `account` is the identifier as typed (normalised), `address` the caller's IP.
 */
async function verifySecret(
  deps: Deps,
  account: string,
  address: string,
  user: DbUserRow | undefined,
  kind: 'password' | 'pin',
  secret: string,
): Promise<DbUserRow> {
  // Per account and address together: one noisy address cannot lock out other accounts behind it.
  const pair = await deps.backoff.claimWindow(`pair:${account}|${address}`, PAIR_LIMIT);
  if (!pair.ok) throw tooMany(pair.waitMs);
  const key = `acct:${account}`;
  const claim = await deps.backoff.claimAttempt(key);
  if (!claim.ok) throw tooMany(claim.waitMs);
  const hash = kind === 'password' ? user?.password_hash : user?.pin_hash;
  const ok = hash ? await deps.hasher.verify(hash, secret) : (await deps.hasher.dummyVerify(secret), false);
  if (!ok || !user || !user.active) throw invalidCredentials();
  await deps.backoff.succeed(key);
  return user;
}

export async function signInWithPassword(deps: Deps, email: string, password: string, address: string): Promise<DbUserRow> {
  const user = await findUserByEmail(deps.db, email);
  // Pickers sign in with badge and PIN only.
  const eligible = user && user.role !== 'picker' ? user : undefined;
  return verifySecret(deps, `e:${email}`, address, eligible, 'password', password);
}

export async function signInWithBadge(deps: Deps, badge: string, pin: string, address: string): Promise<DbUserRow> {
  const code = normaliseBadge(badge);
  const user = await findUserByBadge(deps.db, code);
  return verifySecret(deps, `b:${code}`, address, user, 'pin', pin);
}

export async function changePassword(deps: Deps, userId: number, current: string, next: string): Promise<void> {
  const user = await findUserById(deps.db, userId);
  if (!user?.password_hash || !(await deps.hasher.verify(user.password_hash, current))) {
    throw new AppError('validation', 'validation_failed', 'The current password is not right', [{ field: 'currentPassword', message: 'not right' }]);
  }
  const hash = await deps.hasher.hash(next);
  await updateUser(deps.db, userId, { password_hash: hash });
  await bumpTokenVersion(deps.db, userId);
  await audit(deps.db, { userId, action: 'password.changed' });
}

/**
 * Answers a reset request with the same work whatever the address: one counter claim in the
 * database (also the per-address mail limit), then the answer. Looking the address up, storing the
 * token and mailing run after the answer, so neither time nor work tells a known address apart.
 */
export async function requestPasswordReset(deps: Deps, email: string): Promise<void> {
  const claim = await deps.backoff.claimWindow(`reset:${email}`, RESET_MAIL_LIMIT);
  if (!claim.ok) {
    const s = Math.ceil(claim.waitMs / 1000);
    throw new AppError(
      'rate_limited',
      'too_many_resets',
      `Reset links for this address were asked for ${RESET_MAIL_LIMIT.limit} times in the last hour; check your mail, or try again in ${Math.ceil(s / 60)} min`,
      { retryAfterSeconds: s },
    );
  }
  deps.background.run('password reset mail', () => mailPasswordReset(deps, email));
}

async function mailPasswordReset(deps: Deps, email: string): Promise<void> {
  const { token, hash } = newToken();
  const user = await findUserByEmail(deps.db, email);
  if (!user || !user.active || user.role === 'picker') return;
  const now = Date.now();
  const expiresAt = new Date(now + RESET_TTL_MS).toISOString();
  await insertPasswordReset(deps.db, { user_id: user.id, token_hash: hash, expires_at: expiresAt, created_at: new Date(now).toISOString() });
  const link = `${deps.config.publicUrl}/reset-password?token=${token}`;
  await deps.mailer.send({
    to: email,
    subject: 'Reset your Aislewright password',
    text: `Hello ${user.name},\n\nSomeone asked to reset the password of your Aislewright account. To choose a new one, open this link within 60 minutes:\n\n${link}\n\nIf it was not you, ignore this message; your password stays as it is.\n`,
    link: { tokenHash: hash, expiresAt },
  });
}

export async function completePasswordReset(deps: Deps, token: string, newPassword: string): Promise<void> {
  const row = await passwordResetByTokenHash(deps.db, sha256(token));
  if (!row || row.used_at || row.expires_at < new Date().toISOString()) {
    throw new AppError('validation', 'invalid_token', 'This reset link is not valid any more; ask for a new one');
  }
  const hash = await deps.hasher.hash(newPassword);
  const closed = await deps.db.transaction(async (trx) => {
    // Single use, even under a double submit: the update only succeeds while used_at is empty.
    const now = new Date().toISOString();
    if (!(await markResetUsed(trx, row.id, now))) throw new AppError('validation', 'invalid_token', 'This reset link has already been used');
    // Other reset links of the same account stop working too.
    const others = await closeOpenResets(trx, row.user_id, now);
    await updateUser(trx, row.user_id, { password_hash: hash });
    await bumpTokenVersion(trx, row.user_id);
    return [sha256(token), ...others];
  });
  await closeOutboxLinks(deps.db, closed, 'used');
  await audit(deps.db, { userId: row.user_id, action: 'password.reset' });
}

async function liveInvite(db: Knex, token: string): Promise<DbInviteRow> {
  const inv = await inviteByTokenHash(db, sha256(token));
  if (!inv || inv.accepted_at || inv.expires_at < new Date().toISOString()) {
    throw new AppError('not_found', 'invalid_token', 'This invitation is not valid any more; ask your admin for a new one');
  }
  return inv;
}

export async function inviteInfo(db: Knex, token: string): Promise<InviteInfo> {
  const inv = await liveInvite(db, token);
  return { email: inv.email, role: inv.role, expiresAt: inv.expires_at };
}

export async function acceptInvite(deps: Deps, token: string, name: string, password: string): Promise<DbUserRow> {
  const inv = await liveInvite(deps.db, token);
  const emailTaken = () => new AppError('conflict', 'email_taken', 'An account with this e-mail already exists');
  if (await findUserByEmail(deps.db, inv.email)) throw emailTaken();
  const hash = await deps.hasher.hash(password);
  // Another invitation to the same address accepted at the same moment takes the e-mail first: 409.
  const id = await uniqueOrConflict(
    deps.db.transaction(async (trx) => {
      if (!(await markInviteAccepted(trx, inv.id, new Date().toISOString())))
        throw new AppError('not_found', 'invalid_token', 'This invitation has already been used');
      return insertUser(
        trx,
        { name, email: inv.email, badge: null, role: inv.role, password_hash: hash, pin_hash: null, created_at: new Date().toISOString() },
        JSON.parse(inv.site_ids) as number[],
      );
    }),
    emailTaken,
  );
  await closeOutboxLinks(deps.db, [inv.token_hash], 'used');
  await audit(deps.db, { userId: id, action: 'invite.accepted', subject: inv.email });
  return (await findUserById(deps.db, id))!;
}
