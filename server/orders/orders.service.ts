import type { Knex } from 'knex';
import type { RowIssue } from '../../shared/imports';
import type { ImportResult, OrderInput } from '../../shared/orders';
import { trimSpaces } from '../../shared/input-rules';
import { audit } from '../audit/audit';
import { AppError, notFound } from '../http/errors';
import type { Q } from '../db/knex';
import {
  getOrderRow,
  insertOrder,
  linesOf,
  ordersOfSiteBy,
  replaceOrderLines,
  setOrderStatus,
  skuMap,
  upsertSkus,
  waveNames,
  type DbOrderRow,
} from './orders.repository';
import { validateOrderRows, validateSkuRows, type InputRow, type OrderRecord } from './orders.validate';

const empty = (errors: RowIssue[], warnings: RowIssue[] = []): ImportResult => ({ ok: false, errors, warnings, created: 0, unchanged: 0, updated: 0 });

/** Bins named in `bins` that the site's active plan does not have (all of them when there is no plan). */
export type BinChecker = (bins: string[]) => Promise<Set<string>>;

/** SKU master: all rows checked first; any error → nothing saved. Bins off the active plan are warnings. */
export async function importSkus(
  db: Knex,
  siteId: number,
  userId: number | null,
  sheet: string,
  rows: InputRow[],
  missingBins: BinChecker,
): Promise<ImportResult> {
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

/** A pushed order the host system changed after it left the open state (details of the 409). */
export interface LockedOrder {
  order: string;
  field: string;
  status: DbOrderRow['status'];
  waveId: number | null;
}

/**
 * Saves checked orders in one transaction. A reference already known is never duplicated: an open
 * order whose content changed is updated; an unchanged one is counted unchanged. A changed order that
 * is no longer open (in a released wave, picked, cancelled) is counted unchanged too (files), or,
 * with `refuseLocked`, refuses the whole batch with 409 naming the orders and their waves (push API).
 */
export async function saveOrders(
  db: Knex,
  siteId: number,
  orders: OrderRecord[],
  source: string,
  options: { refuseLocked?: (order: OrderRecord) => string } = {},
): Promise<Pick<ImportResult, 'created' | 'unchanged' | 'updated'>> {
  const skus = await skuMap(db, siteId);
  return db.transaction(async (trx) => {
    const refs = orders.map((o) => o.ref);
    const existing = new Map((await ordersOfSiteBy(trx, siteId, 'ref', refs)).map((r) => [r.ref, r]));
    const lines = await linesOf(
      trx,
      [...existing.values()].map((r) => r.id),
    );
    let created = 0;
    let unchanged = 0;
    let updated = 0;
    const locked: LockedOrder[] = [];
    for (const o of orders) {
      const old = existing.get(o.ref);
      const changed = old && (!sameLines(lines.get(old.id) ?? [], o.lines) || old.due !== o.due || old.priority !== o.priority);
      if (!old) {
        await insertOrder(trx, siteId, o, source, skus);
        created++;
      } else if (changed && old.status === 'open') {
        await replaceOrderLines(trx, old.id, o, skus);
        updated++;
      } else if (changed && options.refuseLocked) {
        locked.push({ order: o.ref, field: options.refuseLocked(o), status: old.status, waveId: old.wave_id });
      } else {
        unchanged++;
      }
    }
    if (locked.length) throw await lockedOrdersError(trx, locked);
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

const STATUS_WORDS: Record<DbOrderRow['status'], string> = {
  open: 'open',
  planned: 'in a released wave',
  picking: 'being picked',
  done: 'picked',
  cancelled: 'cancelled',
};

async function lockedOrdersError(db: Q, locked: LockedOrder[]): Promise<AppError> {
  const waveIds = [...new Set(locked.map((l) => l.waveId).filter((id): id is number => id !== null))];
  const names = await waveNames(db, waveIds);
  const details = locked.map((l) => {
    const wave = l.waveId === null ? null : (names.get(l.waveId) ?? null);
    const where = wave ? ` (wave "${wave}", id ${l.waveId})` : '';
    return {
      order: l.order,
      field: l.field,
      status: l.status,
      waveId: l.waveId,
      wave,
      message: `order ${l.order} is ${STATUS_WORDS[l.status]}${where} and can no longer be changed; cancel its lines on the live board or send the change as a new order`,
    };
  });
  const first = details[0]!;
  const released = locked.every((l) => l.status === 'planned' || l.status === 'picking');
  return new AppError(
    'conflict',
    released ? 'order_released' : 'order_locked',
    `Nothing was saved: ${first.message}${details.length > 1 ? ` (and ${details.length - 1} more order${details.length === 2 ? '' : 's'})` : ''}`,
    details,
  );
}

/**
 * JSON push from the host system: the same checks as files, but answered as an API should. A batch
 * naming one order twice is refused (400 duplicate_order); a row problem such as an unknown SKU is
 * refused (422, the order and field named); a change to an order that has left the open state is
 * refused (409 order_released with the wave). In every case nothing is saved.
 */
export async function pushOrders(db: Knex, siteId: number, input: OrderInput[]): Promise<ImportResult> {
  const firstAt = new Map<string, number>();
  const twice: { field: string; order: string; message: string }[] = [];
  input.forEach((o, i) => {
    const ref = trimSpaces(o.order);
    const first = firstAt.get(ref);
    if (first === undefined) firstAt.set(ref, i);
    else
      twice.push({
        field: `orders.${i}.order`,
        order: ref,
        message: `order ${ref} appears more than once in this request (orders.${first} and orders.${i}); send each order once with all its lines`,
      });
  });
  if (twice.length) throw new AppError('validation', 'duplicate_order', `Nothing was saved: ${twice[0]!.message}`, twice);

  // One row per line; `at` maps a row back to its place in the request for the error's field name.
  const rows: InputRow[] = [];
  const at: { order: number; line: number }[] = [];
  input.forEach((o, i) => {
    o.lines.forEach((l, k) => {
      at.push({ order: i, line: k });
      rows.push({ row: at.length, values: { order: o.order, sku: l.sku, qty: l.qty, due: o.due ?? '', priority: o.priority ?? '' } });
    });
  });
  const skus = await skuMap(db, siteId);
  const { orders, errors } = validateOrderRows('request', rows, (s) => skus.has(s));
  if (errors.length) {
    const details = errors.map((e) => {
      const p = at[(e.row ?? 1) - 1]!;
      const field = e.column === 'sku' || e.column === 'qty' ? `orders.${p.order}.lines.${p.line}.${e.column}` : `orders.${p.order}.${e.column ?? 'order'}`;
      return { order: trimSpaces(input[p.order]!.order), field, value: e.value, message: e.message };
    });
    const code = errors.every((e) => /is not in the SKU master/.test(e.message)) ? 'unknown_sku' : 'orders_invalid';
    const first = details[0]!;
    throw new AppError(
      'unprocessable',
      code,
      `Nothing was saved: order ${first.order}, ${first.field}: ${first.message}${details.length > 1 ? ` (and ${details.length - 1} more problem${details.length === 2 ? '' : 's'})` : ''}`,
      details,
    );
  }
  const indexOf = new Map(input.map((o, i) => [trimSpaces(o.order), i]));
  const counts = await saveOrders(db, siteId, orders, 'api', { refuseLocked: (o) => `orders.${indexOf.get(o.ref) ?? 0}` });
  await audit(db, { siteId, userId: null, action: 'orders.imported', detail: { source: 'api', ...counts } });
  return { ok: true, errors: [], warnings: [], ...counts };
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
    const o = await getOrderRow(trx, siteId, orderId);
    if (!o) throw notFound('Order');
    if (o.status !== 'open') {
      throw new AppError('conflict', 'order_not_open', `Order ${o.ref} ${NOT_OPEN[o.status] ?? `is ${o.status}`}; only open orders can be cancelled.`, {
        status: o.status,
        waveId: o.wave_id,
      });
    }
    await setOrderStatus(trx, orderId, 'cancelled');
    await audit(trx, { siteId, userId, action: 'order.cancelled', subject: o.ref, detail: { orderId, ...(reason ? { reason } : {}) } });
  });
}
