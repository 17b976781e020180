/**
 * Retention: how long stored idempotency answers, mail bodies and attachments, used or expired
 * invitations and password resets, and audit entries are kept. Pruning runs daily in the server and
 * on demand; each run is itself written to the audit log with what it removed.
 */
import type { Knex } from 'knex';
import { DEFAULT_RETENTION, type PruneCounts, type RetentionSettings, type RetentionState } from '../../shared/data-safety';
import { audit } from '../audit/audit';

const DAY_MS = 86_400_000;
const KEYS = Object.keys(DEFAULT_RETENTION) as (keyof RetentionSettings)[];

export async function getRetention(db: Knex): Promise<RetentionSettings> {
  const rows = await db('retention_settings').select<{ key: string; days: number }[]>('key', 'days');
  const out = { ...DEFAULT_RETENTION };
  for (const r of rows) if ((KEYS as string[]).includes(r.key)) out[r.key as keyof RetentionSettings] = r.days;
  return out;
}

export async function setRetention(db: Knex, patch: Partial<RetentionSettings>, userId: number): Promise<RetentionSettings> {
  const now = new Date().toISOString();
  await db.transaction(async (trx) => {
    for (const key of KEYS) {
      const days = patch[key];
      if (days === undefined) continue;
      await trx('retention_settings').insert({ key, days, updated_at: now, updated_by: userId }).onConflict('key').merge();
    }
    await audit(trx, { userId, action: 'retention.changed', detail: patch });
  });
  return getRetention(db);
}

const cutoff = (now: Date, days: number) => new Date(now.getTime() - days * DAY_MS).toISOString();

/** Prunes by the stored settings and audits the run (also when nothing was old enough). */
export async function pruneNow(db: Knex, opts: { now?: Date; userId?: number | null } = {}): Promise<PruneCounts> {
  const now = opts.now ?? new Date();
  const s = await getRetention(db);
  const counts = await db.transaction(async (trx) => {
    const idempotencyAnswers = await trx('pick_requests').where('created_at', '<', cutoff(now, s.idempotencyDays)).delete();
    // A message still waiting for a retry keeps its body: the retry needs it.
    const outboxBodies = await trx('mail_outbox')
      .whereIn('status', ['stored', 'sent', 'failed'])
      .whereNull('pruned_at')
      .where('created_at', '<', cutoff(now, s.outboxDays))
      .update({ text: '', html: null, attachments: '[]', pruned_at: now.toISOString() });
    const inviteCut = cutoff(now, s.invitesDays);
    const invites = await trx('invites')
      .where((q) => q.where('accepted_at', '<', inviteCut).orWhere('expires_at', '<', inviteCut))
      .delete();
    const passwordResets = await trx('password_resets')
      .where((q) => q.where('used_at', '<', inviteCut).orWhere('expires_at', '<', inviteCut))
      .delete();
    const auditEntries = await trx('audit_log').where('at', '<', cutoff(now, s.auditDays)).delete();
    const c: PruneCounts = { idempotencyAnswers, outboxBodies, invites, passwordResets, auditEntries };
    await audit(trx, { userId: opts.userId ?? null, action: 'retention.pruned', detail: { ...c, settings: s } });
    return c;
  });
  return counts;
}

export async function retentionState(db: Knex): Promise<RetentionState> {
  const last = await db('audit_log')
    .where({ action: 'retention.pruned' })
    .orderBy('id', 'desc')
    .first<{ at: string; detail: string | null } | undefined>('at', 'detail');
  let lastRun: RetentionState['lastRun'] = null;
  if (last?.detail) {
    const d = JSON.parse(last.detail) as PruneCounts;
    lastRun = {
      at: last.at,
      counts: {
        idempotencyAnswers: d.idempotencyAnswers,
        outboxBodies: d.outboxBodies,
        invites: d.invites,
        passwordResets: d.passwordResets,
        auditEntries: d.auditEntries,
      },
    };
  }
  return { settings: await getRetention(db), defaults: DEFAULT_RETENTION, lastRun };
}
