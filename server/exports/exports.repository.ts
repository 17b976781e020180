/** The rows the exports read: every query of a site's orders, pick lines, users and tables. */
import type { Knex } from 'knex';
import type { Q } from '../db/knex';

type Row = Record<string, string | number | boolean | null>;

/** Each order line with its order's fields and wave name, by order reference then line number. */
export async function orderLineRows(db: Q, siteId: number): Promise<Row[]> {
  return db('orders as o')
    .leftJoin('order_lines as l', 'l.order_id', 'o.id')
    .leftJoin('waves as w', 'w.id', 'o.wave_id')
    .where('o.site_id', siteId)
    .orderBy('o.ref')
    .orderBy('l.line_no')
    .select('o.ref', 'o.status', 'o.due', 'o.priority', 'o.source', 'o.created_at', 'w.name as wave', 'l.line_no', 'l.sku', 'l.qty');
}

/** Each pick line with its wave, trip, stop and who confirmed it, in the order the lines were written. */
export async function pickLineRows(db: Q, siteId: number): Promise<Row[]> {
  return db('pick_lines as p')
    .join('trips as t', 't.id', 'p.trip_id')
    .join('waves as w', 'w.id', 't.wave_id')
    .leftJoin('stops as s', 's.id', 'p.stop_id')
    .leftJoin('users as u', 'u.id', 'p.confirmed_by')
    .where('t.site_id', siteId)
    .orderBy('p.id')
    .select(
      'w.name as wave',
      't.n as trip',
      's.n as stop',
      'p.order_ref',
      'p.sku',
      'p.description',
      'p.bin',
      'p.qty',
      'p.picked_qty',
      'p.status',
      'p.short_reason',
      'u.name as by',
      'u.badge as badge',
      'p.confirmed_at',
    );
}

/** The site's members, and the admins who reach it without being members. */
export async function siteUserRows(db: Q, siteId: number): Promise<{ rows: Row[]; admins: Row[] }> {
  const rows = await db('users as u')
    .join('user_sites as us', 'us.user_id', 'u.id')
    .where('us.site_id', siteId)
    .orderBy('u.role')
    .orderBy('u.name')
    .select('u.id', 'u.name', 'u.email', 'u.badge', 'u.role', 'u.active', 'u.created_at');
  const admins = await db('users')
    .where({ role: 'admin' })
    .whereNotIn(
      'id',
      rows.map((r: { id: number }) => r.id),
    )
    .orderBy('name')
    .select('id', 'name', 'email', 'badge', 'role', 'active', 'created_at');
  return { rows, admins };
}

/** Every table that belongs to the site with its rows as stored (the caller leaves secrets out), one query after another. */
export async function siteTableRows(db: Q, siteId: number): Promise<[string, Record<string, unknown>[]][]> {
  const plans = db('floor_plans').where({ site_id: siteId }).select('id');
  const trips = db('trips').where({ site_id: siteId }).select('id');
  const orders = db('orders').where({ site_id: siteId }).select('id');
  const users = db('user_sites').where({ site_id: siteId }).select('user_id');
  const sources: [string, Knex.QueryBuilder][] = [
    ['sites', db('sites').where({ id: siteId })],
    ['cart_profiles', db('cart_profiles').where({ site_id: siteId })],
    ['users', db('users').whereIn('id', users).select('id', 'name', 'email', 'badge', 'role', 'active', 'created_at')],
    ['floor_plans', db('floor_plans').where({ site_id: siteId })],
    ['floor_plan_aisles', db('floor_plan_aisles').whereIn('plan_id', plans)],
    ['floor_plan_cross_aisles', db('floor_plan_cross_aisles').whereIn('plan_id', plans)],
    ['floor_plan_bins', db('floor_plan_bins').whereIn('plan_id', plans)],
    ['floor_plan_depots', db('floor_plan_depots').whereIn('plan_id', plans)],
    ['floor_plan_closures', db('floor_plan_closures').whereIn('plan_id', plans)],
    ['skus', db('skus').where({ site_id: siteId })],
    ['orders', db('orders').where({ site_id: siteId })],
    ['order_lines', db('order_lines').whereIn('order_id', orders)],
    ['waves', db('waves').where({ site_id: siteId })],
    ['trips', db('trips').where({ site_id: siteId })],
    ['trip_orders', db('trip_orders').whereIn('trip_id', trips)],
    ['trip_assignments', db('trip_assignments').whereIn('trip_id', trips)],
    ['stops', db('stops').whereIn('trip_id', trips)],
    ['pick_lines', db('pick_lines').whereIn('trip_id', trips)],
    ['pick_shorts', db('pick_shorts').where({ site_id: siteId })],
    ['studies', db('studies').where({ site_id: siteId })],
    [
      'integration_tokens',
      db('integration_tokens')
        .where({ site_id: siteId })
        .select('id', 'name', 'prefix', 'created_by', 'created_at', 'expires_at', 'revoked_at', 'last_used_at'),
    ],
    ['audit_log', db('audit_log').where({ site_id: siteId })],
  ];
  const out: [string, Record<string, unknown>[]][] = [];
  for (const [name, q] of sources) out.push([name, (await q) as Record<string, unknown>[]]);
  return out;
}
