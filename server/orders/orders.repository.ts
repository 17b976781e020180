import type { Knex } from 'knex';
import type { Q } from '../db/knex';
import type { OrderDetail, OrdersPage, OrdersQuery, OrderStatus, OrderSummary } from '../../shared/orders';
import type { OrderRecord, SkuRecord } from './orders.validate';

export interface DbSkuRow {
  id: number;
  site_id: number;
  sku: string;
  description: string;
  bin: string;
  unit_weight_kg: number;
  unit_volume_l: number;
  updated_at: string;
}

export interface DbOrderRow {
  id: number;
  site_id: number;
  ref: string;
  status: OrderStatus;
  due: string | null;
  priority: number | null;
  source: string;
  lines: number;
  units: number;
  weight_kg: number;
  volume_l: number;
  wave_id: number | null;
  created_at: string;
}

const SORT_COLUMN: Record<OrdersQuery['sort'], string> = {
  ref: 'ref',
  due: 'due',
  priority: 'priority',
  lines: 'lines',
  units: 'units',
  weightKg: 'weight_kg',
  createdAt: 'created_at',
};

export const toOrderSummary = (o: DbOrderRow): OrderSummary => ({
  id: o.id,
  ref: o.ref,
  status: o.status,
  due: o.due,
  priority: o.priority,
  lines: o.lines,
  units: o.units,
  weightKg: Math.round(o.weight_kg * 1000) / 1000,
  volumeL: Math.round(o.volume_l * 1000) / 1000,
  waveId: o.wave_id,
  createdAt: o.created_at,
});

export async function skuMap(db: Q, siteId: number): Promise<Map<string, DbSkuRow>> {
  const rows = await db<DbSkuRow>('skus').where({ site_id: siteId });
  return new Map(rows.map((r) => [r.sku, r]));
}

/** Upserts by SKU code in chunks (SQLite's bound-variable limit). */
export async function upsertSkus(trx: Knex.Transaction, siteId: number, skus: SkuRecord[]): Promise<void> {
  const now = new Date().toISOString();
  for (let i = 0; i < skus.length; i += 150) {
    const chunk = skus.slice(i, i + 150).map((s) => ({
      site_id: siteId,
      sku: s.sku,
      description: s.description,
      bin: s.bin,
      unit_weight_kg: s.unitWeightKg,
      unit_volume_l: s.unitVolumeL,
      updated_at: now,
    }));
    await trx('skus').insert(chunk).onConflict(['site_id', 'sku']).merge(['description', 'bin', 'unit_weight_kg', 'unit_volume_l', 'updated_at']);
  }
}

/** Order totals from its lines and the SKU master. */
export function orderTotals(o: OrderRecord, skus: Map<string, DbSkuRow>) {
  let units = 0;
  let kg = 0;
  let litres = 0;
  for (const l of o.lines) {
    const s = skus.get(l.sku)!;
    units += l.qty;
    kg += l.qty * s.unit_weight_kg;
    litres += l.qty * s.unit_volume_l;
  }
  return { lines: o.lines.length, units, weight_kg: kg, volume_l: litres };
}

export async function insertOrder(trx: Knex.Transaction, siteId: number, o: OrderRecord, source: string, skus: Map<string, DbSkuRow>): Promise<number> {
  const [{ id }] = await trx('orders').insert(
    {
      site_id: siteId,
      ref: o.ref,
      status: 'open',
      due: o.due,
      priority: o.priority,
      source,
      ...orderTotals(o, skus),
      created_at: new Date().toISOString(),
    },
    'id',
  );
  await trx('order_lines').insert(o.lines.map((l, i) => ({ order_id: id, line_no: i + 1, sku: l.sku, qty: l.qty })));
  return id!;
}

export async function replaceOrderLines(trx: Knex.Transaction, orderId: number, o: OrderRecord, skus: Map<string, DbSkuRow>): Promise<void> {
  await trx('order_lines').where({ order_id: orderId }).delete();
  await trx('order_lines').insert(o.lines.map((l, i) => ({ order_id: orderId, line_no: i + 1, sku: l.sku, qty: l.qty })));
  await trx('orders')
    .where({ id: orderId })
    .update({ due: o.due, priority: o.priority, ...orderTotals(o, skus) });
}

/** The site's orders whose `column` is one of `values` (read 500 at a time: SQLite's bound-parameter limit). */
export async function ordersOfSiteBy<K extends 'id' | 'ref'>(db: Q, siteId: number, column: K, values: DbOrderRow[K][]): Promise<DbOrderRow[]> {
  const rows: DbOrderRow[] = [];
  for (let i = 0; i < values.length; i += 500)
    rows.push(
      ...(await db<DbOrderRow>('orders')
        .where({ site_id: siteId })
        .whereIn(column, values.slice(i, i + 500))),
    );
  return rows;
}

export async function getOrderRow(db: Q, siteId: number, id: number): Promise<DbOrderRow | undefined> {
  return db<DbOrderRow>('orders').where({ site_id: siteId, id }).first();
}

export async function setOrderStatus(db: Q, id: number, status: OrderStatus): Promise<void> {
  await db('orders').where({ id }).update({ status });
}

/** Wave id → name, for the waves named in an answer. */
export async function waveNames(db: Q, waveIds: number[]): Promise<Map<number, string>> {
  const rows = await db('waves').whereIn('id', waveIds).select<{ id: number; name: string }[]>('id', 'name');
  return new Map(rows.map((w) => [w.id, w.name]));
}

/** The SKUs of every open order's lines, by order then line number. */
export async function openOrderSkus(db: Q, siteId: number): Promise<{ ref: string; sku: string }[]> {
  return db('orders as o')
    .join('order_lines as l', 'l.order_id', 'o.id')
    .where({ 'o.site_id': siteId, 'o.status': 'open' })
    .orderBy(['o.id', 'l.line_no'])
    .select('o.ref', 'l.sku');
}

/** The references of the site's open orders (those without lines too). */
export async function openOrderRefs(db: Q, siteId: number): Promise<string[]> {
  return db('orders').where({ site_id: siteId, status: 'open' }).pluck('ref');
}

export async function linesOf(db: Q, orderIds: number[]): Promise<Map<number, { line_no: number; sku: string; qty: number; id: number }[]>> {
  const out = new Map<number, { line_no: number; sku: string; qty: number; id: number }[]>();
  for (let i = 0; i < orderIds.length; i += 500) {
    const rows = await db('order_lines')
      .whereIn('order_id', orderIds.slice(i, i + 500))
      .orderBy(['order_id', 'line_no']);
    for (const r of rows as { id: number; order_id: number; line_no: number; sku: string; qty: number }[]) {
      const list = out.get(r.order_id) ?? [];
      list.push({ id: r.id, line_no: r.line_no, sku: r.sku, qty: r.qty });
      out.set(r.order_id, list);
    }
  }
  return out;
}

export async function pageOrders(db: Q, siteId: number, q: OrdersQuery): Promise<OrdersPage> {
  const base = db<DbOrderRow>('orders').where({ site_id: siteId });
  if (q.status) base.andWhere({ status: q.status });
  if (q.dueBefore) base.andWhere('due', '<=', q.dueBefore);
  if (q.priorityAtMost !== undefined) base.andWhere('priority', '<=', q.priorityAtMost);
  if (q.search) base.andWhere('ref', 'like', `%${q.search.replace(/[%_]/g, '')}%`);
  const [{ n }] = (await base.clone().count<{ n: number }[]>({ n: '*' })) as [{ n: number }];
  const col = SORT_COLUMN[q.sort];
  const rows = await base
    .clone()
    // Orders without a due sort last either way.
    .orderByRaw(`(${col} is null) asc, ${col} ${q.dir}, id asc`)
    .limit(q.pageSize)
    .offset((q.page - 1) * q.pageSize);
  return { total: Number(n), page: q.page, pageSize: q.pageSize, rows: rows.map(toOrderSummary) };
}

export async function orderDetail(db: Q, siteId: number, id: number): Promise<OrderDetail | null> {
  const o = await getOrderRow(db, siteId, id);
  if (!o) return null;
  const lines = (await linesOf(db, [id])).get(id) ?? [];
  const skus = await skuMap(db, siteId);
  const trips = await db('trip_orders')
    .join('trips', 'trips.id', 'trip_orders.trip_id')
    .join('waves', 'waves.id', 'trips.wave_id')
    .where({ 'trip_orders.order_id': id, 'trips.site_id': siteId })
    .orderBy('trips.id', 'desc')
    .select<{ trip_id: number; n: number; status: string; wave_id: number; wave_name: string; totes: string }[]>(
      'trips.id as trip_id',
      'trips.n',
      'trips.status',
      'trips.wave_id',
      'waves.name as wave_name',
      'trip_orders.totes',
    );
  const links = await repickLinks(db, id);
  return {
    ...toOrderSummary(o),
    ...links,
    lineItems: lines.map((l) => ({
      lineNo: l.line_no,
      sku: l.sku,
      description: skus.get(l.sku)?.description ?? '',
      bin: skus.get(l.sku)?.bin ?? null,
      qty: l.qty,
    })),
    trips: trips.map((t) => ({
      tripId: t.trip_id,
      n: t.n,
      status: t.status,
      waveId: t.wave_id,
      waveName: t.wave_name,
      totes: JSON.parse(t.totes) as number[],
    })),
  };
}

/** Re-pick orders made from this order's shorts, and the order this one re-picks (if it is one). */
async function repickLinks(db: Q, orderId: number): Promise<Pick<OrderDetail, 'repickOf' | 'repicks'>> {
  const of = await db('pick_shorts')
    .join('pick_lines', 'pick_lines.id', 'pick_shorts.line_id')
    .where('pick_shorts.repick_order_id', orderId)
    .first<{ id: number; ref: string } | undefined>({ id: 'pick_lines.order_id', ref: 'pick_lines.order_ref' });
  const repicks: { id: number; ref: string; sku: string; qtyOrdered: number; qtyFound: number }[] = await db('pick_shorts')
    .join('pick_lines', 'pick_lines.id', 'pick_shorts.line_id')
    .join('orders', 'orders.id', 'pick_shorts.repick_order_id')
    .where('pick_lines.order_id', orderId)
    .orderBy('orders.id')
    .select({ id: 'orders.id', ref: 'orders.ref', sku: 'pick_lines.sku', qtyOrdered: 'pick_shorts.qty_ordered', qtyFound: 'pick_shorts.qty_found' });
  return { repickOf: of ?? null, repicks: repicks.map((r) => ({ id: r.id, ref: r.ref, sku: r.sku, qty: r.qtyOrdered - r.qtyFound })) };
}
