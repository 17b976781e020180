/**
 * Demo SKUs and open orders for the invented demo site: SKUs slotted over the demo plan's bins, and
 * a morning's orders of 1–5 lines whose SKUs follow a Pareto-like skew (about 20 % of SKUs draw 80 %
 * of lines — common practice, the Pareto rule of thumb). Seeded randomness, so every demo is alike.
 */
import type { Knex } from 'knex';
import { createRng } from '../core/rng';
import { activePlanId } from '../floor-plans/plan-index';
import { saveOrders } from './orders.service';
import { upsertSkus } from './orders.repository';
import type { OrderRecord, SkuRecord } from './orders.validate';

const GOODS = [
  'Tea tin',
  'Stoneware mug',
  'Enamel pan',
  'Linen towel',
  'Beeswax candle',
  'Oak board',
  'Glass jar',
  'Wool throw',
  'Copper kettle',
  'Clay planter',
  'Bamboo brush',
  'Cotton apron',
];
const COLOURS = ['teal', 'amber', 'slate', 'sand', 'moss', 'plum'];

export const DEMO_SKU_COUNT = 600;
export const DEMO_ORDER_COUNT = 160;

export async function seedDemoOrders(db: Knex, siteId: number): Promise<void> {
  const planId = await activePlanId(db, siteId);
  if (!planId) return;
  const bins: string[] = await db('floor_plan_bins').where({ plan_id: planId }).orderBy('idx').pluck('code');
  const rng = createRng(20261202);
  // Spread the SKUs over the plan: every k-th bin, so the walk covers the whole hall.
  const step = Math.max(1, Math.floor(bins.length / DEMO_SKU_COUNT));
  const skus: SkuRecord[] = [];
  for (let i = 0; i < DEMO_SKU_COUNT && i * step < bins.length; i++) {
    const g = GOODS[i % GOODS.length]!;
    skus.push({
      sku: `BW-${String(1000 + i)}`,
      description: `${g}, ${COLOURS[(i * 7) % COLOURS.length]}`,
      bin: bins[i * step]!,
      unitWeightKg: Math.round((0.2 + rng.next() * 2.8) * 100) / 100,
      unitVolumeL: Math.round((0.3 + rng.next() * 4.7) * 100) / 100,
    });
  }
  await db.transaction((trx) => upsertSkus(trx, siteId, skus));
  // 20 % of SKUs draw 80 % of the lines.
  const hot = Math.floor(skus.length * 0.2);
  const pick = () => (rng.next() < 0.8 ? skus[rng.int(hot)]! : skus[hot + rng.int(skus.length - hot)]!);
  const today = new Date();
  today.setUTCHours(0, 0, 0, 0);
  const orders: OrderRecord[] = [];
  for (let i = 0; i < DEMO_ORDER_COUNT; i++) {
    const n = 1 + rng.int(5);
    const lines = new Map<string, number>();
    while (lines.size < n) lines.set(pick().sku, 1 + rng.int(3));
    const due = new Date(today.getTime() + (12 + rng.int(8)) * 3600_000);
    orders.push({
      ref: `WEB-${String(20001 + i)}`,
      due: due.toISOString(),
      priority: rng.next() < 0.15 ? 1 : null,
      lines: [...lines].map(([sku, qty]) => ({ sku, qty })),
      row: null,
    });
  }
  await saveOrders(db, siteId, orders, 'demo');
}
