/**
 * Retention: how long stored idempotency answers, mail bodies and attachments, used or expired
 * invitations and password resets, and audit entries are kept. Pruning runs daily in the server and
 * on demand; each run is itself written to the audit log with what it removed.
 */
import type { Knex } from 'knex';
import { DEFAULT_RETENTION, type PruneCounts, type RetentionSettings, type RetentionState } from '../../shared/data-safety';
import { audit } from '../audit/audit';
import { latestEntryOf } from '../audit/audit-log.repository';
import { pruneOlderThan, retentionRows, saveRetentionDays } from './retention.repository';

const DAY_MS = 86_400_000;
const KEYS = Object.keys(DEFAULT_RETENTION) as (keyof RetentionSettings)[];

export async function getRetention(db: Knex): Promise<RetentionSettings> {
  const rows = await retentionRows(db);
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
      await saveRetentionDays(trx, key, days, now, userId);
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
    const c = await pruneOlderThan(
      trx,
      {
        idempotency: cutoff(now, s.idempotencyDays),
        outbox: cutoff(now, s.outboxDays),
        // Used or expired invitations and password resets share one setting.
        invites: cutoff(now, s.invitesDays),
        audit: cutoff(now, s.auditDays),
      },
      now.toISOString(),
    );
    await audit(trx, { userId: opts.userId ?? null, action: 'retention.pruned', detail: { ...c, settings: s } });
    return c;
  });
  return counts;
}

export async function retentionState(db: Knex): Promise<RetentionState> {
  const last = await latestEntryOf(db, 'retention.pruned');
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
