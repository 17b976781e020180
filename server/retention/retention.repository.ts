/** The retention settings and what a pruning run deletes, table by table. */
import type { Q } from '../db/knex';
import type { PruneCounts } from '../../shared/data-safety';

export async function retentionRows(db: Q): Promise<{ key: string; days: number }[]> {
  return db('retention_settings').select<{ key: string; days: number }[]>('key', 'days');
}

export async function saveRetentionDays(db: Q, key: string, days: number, at: string, userId: number): Promise<void> {
  await db('retention_settings').insert({ key, days, updated_at: at, updated_by: userId }).onConflict('key').merge();
}

/** Cut-off instants (ISO) per kind of record: rows older than these go. */
export interface PruneCutoffs {
  idempotency: string;
  outbox: string;
  invites: string;
  audit: string;
}

/** Deletes (or, for mail, empties) what is older than the cut-offs; answers the counts. */
export async function pruneOlderThan(db: Q, cut: PruneCutoffs, at: string): Promise<PruneCounts> {
  const idempotencyAnswers = await db('pick_requests').where('created_at', '<', cut.idempotency).delete();
  // A message still waiting for a retry keeps its body: the retry needs it.
  const outboxBodies = await db('mail_outbox')
    .whereIn('status', ['stored', 'sent', 'failed'])
    .whereNull('pruned_at')
    .where('created_at', '<', cut.outbox)
    .update({ text: '', html: null, attachments: '[]', pruned_at: at });
  const invites = await db('invites')
    .where((q) => q.where('accepted_at', '<', cut.invites).orWhere('expires_at', '<', cut.invites))
    .delete();
  const passwordResets = await db('password_resets')
    .where((q) => q.where('used_at', '<', cut.invites).orWhere('expires_at', '<', cut.invites))
    .delete();
  const auditEntries = await db('audit_log').where('at', '<', cut.audit).delete();
  return { idempotencyAnswers, outboxBodies, invites, passwordResets, auditEntries };
}
