/**
 * What an admin or supervisor takes away from a site: orders with their lines and status, pick lines
 * with who confirmed them and when, the site's users and roles, and "site data" — a workbook with a
 * sheet per table for leaving the product. Secrets (password, PIN and token hashes) and binary blobs
 * (packed plan arrays, distance tables) are never exported.
 */
import type { Knex } from 'knex';
import type { Cell, Table } from './table-export';

export async function ordersTable(db: Knex, siteId: number): Promise<Table> {
  const rows = await db('orders as o')
    .leftJoin('order_lines as l', 'l.order_id', 'o.id')
    .leftJoin('waves as w', 'w.id', 'o.wave_id')
    .where('o.site_id', siteId)
    .orderBy('o.ref')
    .orderBy('l.line_no')
    .select('o.ref', 'o.status', 'o.due', 'o.priority', 'o.source', 'o.created_at', 'w.name as wave', 'l.line_no', 'l.sku', 'l.qty');
  return {
    name: 'orders',
    header: ['order', 'status', 'due', 'priority', 'source', 'created (UTC)', 'wave', 'line', 'sku', 'qty'],
    rows: rows.map((r: Record<string, Cell>) => [r.ref, r.status, r.due, r.priority, r.source, r.created_at, r.wave, r.line_no, r.sku, r.qty]),
  };
}

export async function pickLinesTable(db: Knex, siteId: number): Promise<Table> {
  const rows = await db('pick_lines as p')
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
  return {
    name: 'pick lines',
    header: [
      'wave',
      'trip',
      'stop',
      'order',
      'sku',
      'description',
      'bin',
      'qty ordered',
      'qty picked',
      'status',
      'short reason',
      'confirmed by',
      'badge',
      'confirmed at (UTC)',
    ],
    rows: rows.map((r: Record<string, Cell>) => [
      r.wave,
      r.trip,
      r.stop,
      r.order_ref,
      r.sku,
      r.description,
      r.bin,
      r.qty,
      r.picked_qty,
      r.status,
      r.short_reason,
      r.by,
      r.badge,
      r.confirmed_at,
    ]),
  };
}

export async function usersTable(db: Knex, siteId: number): Promise<Table> {
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
  return {
    name: 'users',
    header: ['name', 'e-mail', 'badge', 'role', 'active', 'created (UTC)', 'site member'],
    rows: [
      ...rows.map((r: Record<string, Cell>) => [r.name, r.email, r.badge, r.role, r.active ? 'yes' : 'no', r.created_at, 'yes']),
      // Admins reach every site without being members; listed so the export says who can.
      ...admins.map((r: Record<string, Cell>) => [r.name, r.email, r.badge, r.role, r.active ? 'yes' : 'no', r.created_at, 'no (admin: every site)']),
    ],
  };
}

const SECRET = /(_hash|^password|^pin|^token)$/;

function tableOf(name: string, rows: Record<string, unknown>[]): Table {
  const header = rows.length ? Object.keys(rows[0]!).filter((k) => !SECRET.test(k) && !Buffer.isBuffer(rows[0]![k])) : [];
  return {
    name,
    header,
    rows: rows.map((r) =>
      header.map((h) => {
        const v = r[h];
        return v === null || v === undefined || typeof v === 'string' || typeof v === 'number' || typeof v === 'boolean'
          ? v
          : Buffer.isBuffer(v)
            ? ''
            : JSON.stringify(v);
      }),
    ),
  };
}

/** Every table that belongs to the site, one sheet each (rows as stored). */
export async function siteDataTables(db: Knex, siteId: number): Promise<Table[]> {
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
  const out: Table[] = [];
  for (const [name, q] of sources) out.push(tableOf(name, (await q) as Record<string, unknown>[]));
  return out;
}
