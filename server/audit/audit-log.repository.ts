/** Reading the audit trail: filtered, paged, newest first, with who did it and at which site. */
import type { Knex } from 'knex';
import type { AuditFilter, AuditItem, AuditPage } from '../../shared/data-safety';
import type { Table } from '../exports/table-export';

/** `site`: one site's entries; `all`: every entry, including account events that belong to no site. */
export type AuditScope = { site: number } | 'all';

interface Row {
  id: number;
  at: string;
  site_id: number | null;
  site_code: string | null;
  user_id: number | null;
  user_name: string | null;
  user_role: string | null;
  action: string;
  subject: string | null;
  detail: string | null;
  device: string | null;
}

/** A date alone means the whole day: `to=2026-12-05` includes that day. */
function upper(to: string): { op: '<' | '<='; value: string } {
  if (/^\d{4}-\d{2}-\d{2}$/.test(to)) {
    const next = new Date(`${to}T00:00:00.000Z`);
    next.setUTCDate(next.getUTCDate() + 1);
    return { op: '<', value: next.toISOString() };
  }
  return { op: '<=', value: new Date(to).toISOString() };
}

function filtered(db: Knex, scope: AuditScope, f: AuditFilter): Knex.QueryBuilder {
  const q = db('audit_log as a');
  if (scope !== 'all') q.where('a.site_id', scope.site);
  if (f.userId) q.where('a.user_id', f.userId);
  if (f.action) q.where('a.action', f.action);
  if (f.from) q.where('a.at', '>=', /^\d{4}-\d{2}-\d{2}$/.test(f.from) ? `${f.from}T00:00:00.000Z` : new Date(f.from).toISOString());
  if (f.to) {
    const u = upper(f.to);
    q.where('a.at', u.op, u.value);
  }
  return q;
}

function withNames(q: Knex.QueryBuilder): Knex.QueryBuilder {
  return q
    .leftJoin('users as u', 'u.id', 'a.user_id')
    .leftJoin('sites as s', 's.id', 'a.site_id')
    .select(
      'a.id',
      'a.at',
      'a.site_id',
      's.code as site_code',
      'a.user_id',
      'u.name as user_name',
      'u.role as user_role',
      'a.action',
      'a.subject',
      'a.detail',
      'a.device',
    )
    .orderBy('a.at', 'desc')
    .orderBy('a.id', 'desc');
}

const toItem = (r: Row): AuditItem => ({
  id: r.id,
  at: r.at,
  siteId: r.site_id,
  siteCode: r.site_code,
  userId: r.user_id,
  userName: r.user_name,
  userRole: r.user_role,
  action: r.action,
  subject: r.subject,
  detail: r.detail,
  device: r.device,
});

export async function auditPage(db: Knex, scope: AuditScope, f: AuditFilter, page: number, pageSize: number): Promise<AuditPage> {
  const c = (await filtered(db, scope, f).count({ n: '*' }).first()) as { n: number | string } | undefined;
  const rows = (await withNames(filtered(db, scope, f))
    .limit(pageSize)
    .offset((page - 1) * pageSize)) as Row[];
  const base = () => (scope === 'all' ? db('audit_log as a') : db('audit_log as a').where('a.site_id', scope.site));
  const actions = (await base().distinct('a.action').orderBy('a.action')).map((r: { action: string }) => r.action);
  const people = (await base().join('users as u', 'u.id', 'a.user_id').distinct('u.id', 'u.name').orderBy('u.name')) as { id: number; name: string }[];
  return { items: rows.map(toItem), total: Number(c?.n ?? 0), page, pageSize, actions, people };
}

/** At most this many rows in one export; the filters narrow a longer log. */
export const AUDIT_EXPORT_MAX = 200_000;

export async function auditTable(db: Knex, scope: AuditScope, f: AuditFilter): Promise<Table> {
  const rows = (await withNames(filtered(db, scope, f)).limit(AUDIT_EXPORT_MAX)) as Row[];
  return {
    name: 'audit log',
    header: ['time (UTC)', 'site', 'person', 'role', 'action', 'record', 'device', 'detail'],
    rows: rows.map((r) => [r.at, r.site_code ?? '', r.user_name ?? '', r.user_role ?? '', r.action, r.subject ?? '', r.device ?? '', r.detail ?? '']),
  };
}

/** The latest entry of one action (when it was, and its detail as stored), or undefined. */
export async function latestEntryOf(db: Knex, action: string): Promise<{ at: string; detail: string | null } | undefined> {
  return db('audit_log').where({ action }).orderBy('id', 'desc').first<{ at: string; detail: string | null } | undefined>('at', 'detail');
}
