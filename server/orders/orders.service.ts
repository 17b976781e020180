import type { Knex } from 'knex';
import type { RowIssue } from '../../shared/imports';
import type { ImportResult, OrderInput } from '../../shared/orders';
import { audit } from '../audit/audit';
import { AppError, notFound } from '../http/errors';
import { insertOrder, linesOf, replaceOrderLines, skuMap, upsertSkus, type DbOrderRow } from './orders.repository';
import { validateOrderRows, validateSkuRows, type InputRow, type OrderRecord } from './orders.validate';

const empty = (errors: RowIssue[], warnings: RowIssue[] = []): ImportResult => ({ ok: false, errors, warnings, created: 0, unchanged: 0, updated: 0 });

/** Bins named in `bins` that the site's active plan does not have (all of them when there is no plan). */
export type BinChecker = (bins: string[]) => Promise<Set<string>>;

/** SKU master: all rows checked first; any error → nothing saved. Bins off the active plan are warnings. */
export async function importSkus(db: Knex, siteId: number, userId: number | null, sheet: string, rows: InputRow[], missingBins: BinChecker): Promise<ImportResult> {
  const { skus, errors } = validateSkuRows(sheet, rows);
  if (errors.length) return empty(errors);
  const missing = await missingBins(skus.map((s) => s.bin));
  const warnings: RowIssue[] = [];
  rows.forEach((r, i) => {
    const s = skus[i];
    if (s && missing.has(s.bin)) warnings.push({ sheet, row: r.row, column: 'bin', value: s.bin, message: `bin ${s.bin} is not on the active floor plan` });
  });
  const before = await skuMap(db, siteId);
  await db.transaction((trx) => upsertSkus(trx, siteId, skus));
  const created = skus.filter((s) => !before.has(s.sku)).length;
  await audit(db, { siteId, userId, action: 'skus.imported', detail: { rows: skus.length, created } });
  return { ok: true, errors: [], warnings, created, unchanged: 0, updated: skus.length - created };
}

const sameLines = (a: { sku: string; qty: number }[], b: { sku: string; qty: number }[]) =>
  a.length === b.length && a.every((l, i) => l.sku === b[i]!.sku && l.qty === b[i]!.qty);

/**
 * Saves checked orders in one transaction. A reference already known is never duplicated: an open
 * order whose content changed is updated; anything else is left as it is and counted unchanged.
 */
export async function saveOrders(db: Knex, siteId: number, orders: OrderRecord[], source: string): Promise<Pick<ImportResult, 'created' | 'unchanged' | 'updated'>> {
  const skus = await skuMap(db, siteId);
  return db.transaction(async (trx) => {
    const refs = orders.map((o) => o.ref);
    const existing = new Map<string, DbOrderRow>();
    for (let i = 0; i < refs.length; i += 500) {
      for (const r of await trx<DbOrderRow>('orders').where({ site_id: siteId }).whereIn('ref', refs.slice(i, i + 500))) existing.set(r.ref, r);
    }
    const lines = await linesOf(trx, [...existing.values()].map((r) => r.id));
    let created = 0;
    let unchanged = 0;
    let updated = 0;
    for (const o of orders) {
      const old = existing.get(o.ref);
      if (!old) {
        await insertOrder(trx, siteId, o, source, skus);
        created++;
      } else if (old.status === 'open' && (!sameLines(lines.get(old.id) ?? [], o.lines) || old.due !== o.due || old.priority !== o.priority)) {
        await replaceOrderLines(trx, old.id, o, skus);
        updated++;
      } else {
        unchanged++;
      }
    }
    return { created, unchanged, updated };
  });
}

export async function importOrderRows(db: Knex, siteId: number, userId: number | null, sheet: string, rows: InputRow[], source: string): Promise<ImportResult> {
  const skus = await skuMap(db, siteId);
  const { orders, errors } = validateOrderRows(sheet, rows, (s) => skus.has(s));
  if (errors.length) return empty(errors);
  if (orders.length === 0) return empty([{ sheet, row: null, column: null, value: null, message: 'the file has no order lines' }]);
  const counts = await saveOrders(db, siteId, orders, source);
  await audit(db, { siteId, userId, action: 'orders.imported', detail: { source, ...counts } });
  return { ok: true, errors: [], warnings: [], ...counts };
}

/** JSON push from the host system: the same checks, rows numbered by position in the request. */
export async function pushOrders(db: Knex, siteId: number, input: OrderInput[]): Promise<ImportResult> {
  const rows: InputRow[] = [];
  input.forEach((o, i) => {
    for (const l of o.lines) rows.push({ row: i + 1, values: { order: o.order, sku: l.sku, qty: l.qty, due: o.due ?? '', priority: o.priority ?? '' } });
  });
  return importOrderRows(db, siteId, null, 'request', rows, 'api');
}

const NOT_OPEN: Record<string, string> = {
  planned: 'is in a released wave; cancel the wave (waves page) or its trip (live board) first, and it returns to the open orders',
  picking: 'is being picked; cancel its trip from the live board instead',
  done: 'is already picked',
  cancelled: 'is already cancelled',
};

/** Cancels an open order (never one in a wave or picked): it leaves the open pool; the audit log keeps who and why. */
export async function cancelOrder(db: Knex, siteId: number, userId: number, orderId: number, reason: string | undefined): Promise<void> {
  await db.transaction(async (trx) => {
    const o = await trx<DbOrderRow>('orders').where({ site_id: siteId, id: orderId }).first();
    if (!o) throw notFound('Order');
    if (o.status !== 'open') {
      throw new AppError('conflict', 'order_not_open', `Order ${o.ref} ${NOT_OPEN[o.status] ?? `is ${o.status}`}; only open orders can be cancelled.`, { status: o.status, waveId: o.wave_id });
    }
    await trx('orders').where({ id: orderId }).update({ status: 'cancelled' });
    await audit(trx, { siteId, userId, action: 'order.cancelled', subject: o.ref, detail: { orderId, ...(reason ? { reason } : {}) } });
  });
}
