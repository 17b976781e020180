/**
 * What an admin or supervisor takes away from a site: orders with their lines and status, pick lines
 * with who confirmed them and when, the site's users and roles, and "site data" — a workbook with a
 * sheet per table for leaving the product. Secrets (password, PIN and token hashes) and binary blobs
 * (packed plan arrays, distance tables) are never exported.
 */
import type { Knex } from 'knex';
import type { Cell, Table } from './table-export';
import { orderLineRows, pickLineRows, siteTableRows, siteUserRows } from './exports.repository';

export async function ordersTable(db: Knex, siteId: number): Promise<Table> {
  const rows = await orderLineRows(db, siteId);
  return {
    name: 'orders',
    header: ['order', 'status', 'due', 'priority', 'source', 'created (UTC)', 'wave', 'line', 'sku', 'qty'],
    rows: rows.map((r: Record<string, Cell>) => [r.ref, r.status, r.due, r.priority, r.source, r.created_at, r.wave, r.line_no, r.sku, r.qty]),
  };
}

export async function pickLinesTable(db: Knex, siteId: number): Promise<Table> {
  const rows = await pickLineRows(db, siteId);
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
  const { rows, admins } = await siteUserRows(db, siteId);
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
  return (await siteTableRows(db, siteId)).map(([name, rows]) => tableOf(name, rows));
}
