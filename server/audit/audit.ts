import type { Knex } from 'knex';

export interface AuditEntry {
  siteId?: number | null;
  userId?: number | null;
  action: string;
  subject?: string | null;
  detail?: unknown;
  device?: string | null;
}

/** Appends to the audit trail (who, when, what, device). */
export async function audit(db: Knex | Knex.Transaction, e: AuditEntry): Promise<void> {
  await db('audit_log').insert({
    site_id: e.siteId ?? null,
    user_id: e.userId ?? null,
    action: e.action,
    subject: e.subject ?? null,
    detail: e.detail === undefined ? null : JSON.stringify(e.detail),
    device: e.device ?? null,
    at: new Date().toISOString(),
  });
}
