/** Password-reset links as the reset mail stores them and the reset form uses them up. */
import type { Q } from '../db/knex';

export interface DbPasswordResetRow {
  id: number;
  user_id: number;
  token_hash: string;
  expires_at: string;
  used_at: string | null;
  created_at: string;
}

export async function insertPasswordReset(db: Q, row: Omit<DbPasswordResetRow, 'id' | 'used_at'>): Promise<void> {
  await db('password_resets').insert(row);
}

export async function passwordResetByTokenHash(db: Q, tokenHash: string): Promise<DbPasswordResetRow | undefined> {
  return db<DbPasswordResetRow>('password_resets').where({ token_hash: tokenHash }).first();
}

/** Marks the link used; false when another request used it first. */
export async function markResetUsed(db: Q, id: number, at: string): Promise<boolean> {
  return (await db('password_resets').where({ id }).whereNull('used_at').update({ used_at: at })) === 1;
}

/** Closes the user's other unused links; answers their token hashes. */
export async function closeOpenResets(db: Q, userId: number, at: string): Promise<string[]> {
  const open = db('password_resets').where({ user_id: userId }).whereNull('used_at');
  const hashes: string[] = await open.clone().pluck('token_hash');
  await open.clone().update({ used_at: at });
  return hashes;
}
