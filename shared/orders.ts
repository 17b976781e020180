import { z } from 'zod';
import { RowIssue } from './imports';
import { codeRule, MAX_LINE_QTY, ruledString } from './input-rules';

export const OrderStatus = z.enum(['open', 'planned', 'picking', 'done', 'cancelled']);
export type OrderStatus = z.infer<typeof OrderStatus>;

export const Sku = z.object({
  sku: z.string(),
  description: z.string(),
  bin: z.string(),
  unitWeightKg: z.number(),
  unitVolumeL: z.number(),
  /** False when the bin is not on the site's active floor plan. */
  binOnActivePlan: z.boolean(),
});
export type Sku = z.infer<typeof Sku>;

export const OrderLineInput = z.strictObject({
  sku: ruledString(codeRule),
  qty: z.number().int().positive().max(MAX_LINE_QTY),
});

/** One order as the host system pushes it (JSON API) — the same fields as the order file. */
export const OrderInput = z.strictObject({
  order: ruledString(codeRule),
  due: z.iso.datetime({ offset: true }).or(z.iso.date()).optional(),
  /** 1 is the most urgent (common practice: "P1"), up to 9; omitted = no priority. */
  priority: z.number().int().min(1).max(9).optional(),
  lines: z.array(OrderLineInput).min(1).max(500),
});
export type OrderInput = z.infer<typeof OrderInput>;

export const PushOrdersBody = z.strictObject({ orders: z.array(OrderInput).min(1).max(5000) });

export const ImportResult = z.object({
  ok: z.boolean(),
  errors: z.array(RowIssue),
  warnings: z.array(RowIssue),
  created: z.number().int(),
  /** Orders whose reference was already known: not duplicated, not changed. */
  unchanged: z.number().int(),
  updated: z.number().int(),
});
export type ImportResult = z.infer<typeof ImportResult>;

export const OrderSummary = z.object({
  id: z.number().int(),
  ref: z.string(),
  status: OrderStatus,
  due: z.string().nullable(),
  priority: z.number().int().nullable(),
  lines: z.number().int(),
  units: z.number().int(),
  weightKg: z.number(),
  volumeL: z.number(),
  waveId: z.number().int().nullable(),
  createdAt: z.string(),
});
export type OrderSummary = z.infer<typeof OrderSummary>;

export const OrdersQuery = z.strictObject({
  status: OrderStatus.optional(),
  dueBefore: z.string().max(40).optional(),
  /** Orders at least this urgent: priority 1..priorityAtMost. */
  priorityAtMost: z.coerce.number().int().min(1).max(9).optional(),
  search: z.string().trim().max(64).optional(),
  sort: z.enum(['ref', 'due', 'priority', 'lines', 'units', 'weightKg', 'createdAt']).default('due'),
  dir: z.enum(['asc', 'desc']).default('asc'),
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(500).default(50),
});
export type OrdersQuery = z.infer<typeof OrdersQuery>;

export const OrdersPage = z.object({ total: z.number().int(), page: z.number().int(), pageSize: z.number().int(), rows: z.array(OrderSummary) });
export type OrdersPage = z.infer<typeof OrdersPage>;

export const OrderDetail = OrderSummary.extend({
  lineItems: z.array(z.object({ lineNo: z.number().int(), sku: z.string(), description: z.string(), bin: z.string().nullable(), qty: z.number().int() })),
  /** The trips that carry (or carried) this order, newest first: which wave, which trip, its state. */
  trips: z.array(
    z.object({
      tripId: z.number().int(),
      n: z.number().int(),
      status: z.string(),
      waveId: z.number().int(),
      waveName: z.string(),
      totes: z.array(z.number().int()),
    }),
  ),
  /** Set on an order made to re-pick a short: the order the short happened on. */
  repickOf: z.object({ id: z.number().int(), ref: z.string() }).nullable(),
  /** Orders made to re-pick this order's shorts in a later wave. */
  repicks: z.array(z.object({ id: z.number().int(), ref: z.string(), sku: z.string(), qty: z.number().int() })),
});
export type OrderDetail = z.infer<typeof OrderDetail>;

/** Cancelling an open order: an optional reason, kept in the audit log. */
export const CancelOrderBody = z.strictObject({ reason: z.string().trim().max(200).optional() });
export type CancelOrderBody = z.infer<typeof CancelOrderBody>;
