/**
 * Generated orders for studies: SKUs slotted at random over the plan's bins (random storage, the
 * usual assumption of routing studies such as Petersen 1997), lines drawn from an ABC popularity
 * curve, seeded so a study reruns exactly.
 */
import { createRng, type Rng } from '../core/rng';
import type { PlanBin } from '../core/plan/types';
import type { PlannerOrder } from '../waves/wave-planner';
import type { GeneratedOrders } from '../../shared/studies';

/**
 * Exponent s of the ABC curve F(x) = xˢ (share of lines drawn by the most popular share x of SKUs;
 * Hausman, Schwarz & Graves, Management Science 22(6), 1976 — from memory), chosen so that F(a) = b:
 * "a % of SKUs draw b % of lines". 20/80 gives s ≈ 0.139. Equal shares give 1 (uniform).
 */
export function abcExponent(skuPct: number, linesPct: number): number {
  return Math.log(linesPct / 100) / Math.log(skuPct / 100);
}

/** Popularity rank (0 = most popular) of one line: inverse of F at a uniform draw. O(1). */
export function drawRank(rng: Rng, skus: number, s: number): number {
  const x = rng.next() ** (1 / s);
  return Math.min(skus - 1, Math.floor(x * skus));
}

/**
 * `spec.waves` waves of `spec.ordersPerWave` orders each, lines uniform in [linesMin, linesMax]
 * (distinct SKUs in an order), quantities uniform in 1..qtyMax. Unit weight 0.2–3 kg and volume
 * 0.3–5 L per SKU (invented, the demo SKU master's ranges), so a large order can fill two totes.
 * O(bins + orders × lines). Deterministic for a seed.
 */
export function generateStudyOrders(bins: readonly PlanBin[], spec: GeneratedOrders, seed: number): PlannerOrder[][] {
  const rng = createRng(seed);
  const skuCount = Math.min(spec.skus, bins.length);
  // Partial Fisher–Yates: the first skuCount positions become a uniform random sample of the bins.
  const pos = Int32Array.from({ length: bins.length }, (_, i) => i);
  for (let i = 0; i < skuCount; i++) {
    const j = i + rng.int(bins.length - i);
    const t = pos[i]!;
    pos[i] = pos[j]!;
    pos[j] = t;
  }
  const skus = Array.from({ length: skuCount }, (_, i) => ({
    sku: `GEN-${String(i + 1).padStart(5, '0')}`,
    bin: bins[pos[i]!]!.code,
    unitKg: Math.round((0.2 + rng.next() * 2.8) * 100) / 100,
    unitLitres: Math.round((0.3 + rng.next() * 4.7) * 100) / 100,
  }));
  const s = abcExponent(spec.skewSkuPct, spec.skewLinesPct);
  const waves: PlannerOrder[][] = [];
  for (let w = 0; w < spec.waves; w++) {
    const orders: PlannerOrder[] = [];
    for (let i = 0; i < spec.ordersPerWave; i++) {
      const n = Math.min(skuCount, spec.linesMin + rng.int(spec.linesMax - spec.linesMin + 1));
      const chosen = new Set<number>();
      // Rejection keeps SKUs distinct; with a strong skew the tail still ends it quickly.
      for (let tries = 0; chosen.size < n && tries < n * 200; tries++) chosen.add(drawRank(rng, skuCount, s));
      for (let r = 0; chosen.size < n; r++) chosen.add(r);
      orders.push({
        ref: `S${w + 1}-${String(i + 1).padStart(4, '0')}`,
        due: null,
        priority: null,
        lines: [...chosen].map((r) => {
          const k = skus[r]!;
          return { sku: k.sku, qty: 1 + rng.int(spec.qtyMax), bin: k.bin, unitKg: k.unitKg, unitLitres: k.unitLitres };
        }),
      });
    }
    waves.push(orders);
  }
  return waves;
}
