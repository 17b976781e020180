/**
 * What activating a plan would take away: SKUs whose bin is not on it, open orders it cannot place,
 * and the waves still running on another plan (they keep theirs). Activation refuses without an
 * explicit acknowledgement when SKUs would lose a bin or open orders would lose their placement
 * compared with the plan active now.
 */
import type { Knex } from 'knex';
import * as XLSX from 'xlsx';
import {
  ACTIVATION_CHECK_SAMPLE,
  type ActivationCheck,
  type PlanRef,
  type RunningWave,
  type SkuWithoutBin,
  type UnplaceableOrder,
} from '../../shared/floor-plans';
import { csvDocument, neutraliseCells } from '../../shared/input-rules';
import { openOrderRefs, openOrderSkus, skuMap } from '../orders/orders.repository';
import { runningWavesOffPlan } from '../waves/waves.repository';
import { activePlanRow, type DbFloorPlanRow } from './floor-plans.repository';
import { loadPlanIndex } from './plan-index';
import { unreachableBinCodes } from './reachability';

/** Bins of a plan and those of them a picker can reach from the depot under its open closures. */
interface Slotting {
  onPlan: Set<string>;
  unreachable: Set<string>;
}

async function slottingOf(db: Knex, planId: number): Promise<Slotting> {
  const loaded = await loadPlanIndex(db, planId);
  return { onPlan: new Set(loaded.geometry.bins.map((b) => b.code)), unreachable: new Set(unreachableBinCodes(loaded.geometry, loaded.graph)) };
}

/** Why an order cannot be placed on a plan, or null when every line can be slotted. */
function unplaceableReason(lines: readonly { sku: string }[], skus: Map<string, { bin: string }>, plan: Slotting | null): string | null {
  for (const l of lines) {
    const s = skus.get(l.sku);
    if (!s) return `SKU ${l.sku} is not in the SKU master`;
    if (!plan || !plan.onPlan.has(s.bin)) return `bin ${s.bin} (SKU ${l.sku}) is not on the plan`;
    if (plan.unreachable.has(s.bin)) return `bin ${s.bin} (SKU ${l.sku}) cannot be reached on the plan`;
  }
  return null;
}

const refOf = (r: DbFloorPlanRow): PlanRef => ({ id: r.id, version: r.version ?? 0, name: r.name, state: r.state === 'building' ? 'draft' : r.state });

async function openOrderLines(db: Knex, siteId: number): Promise<Map<string, { sku: string }[]>> {
  const rows = await openOrderSkus(db, siteId);
  const out = new Map<string, { sku: string }[]>();
  for (const r of rows) {
    const list = out.get(r.ref) ?? [];
    list.push({ sku: r.sku });
    out.set(r.ref, list);
  }
  // Orders with no lines still count as open orders (and place trivially).
  for (const ref of await openOrderRefs(db, siteId)) if (!out.has(ref)) out.set(ref, []);
  return out;
}

async function runningWaves(db: Knex, siteId: number, exceptPlanId: number): Promise<RunningWave[]> {
  const rows = await runningWavesOffPlan(db, siteId, exceptPlanId);
  return rows.map((r) => ({ id: r.id, name: r.name, status: r.status, planId: r.plan_id, planVersion: r.version ?? 0, openTrips: Number(r.open_trips) }));
}

export interface FullActivationCheck extends ActivationCheck {
  /** Every SKU without a bin (the answer carries the first ACTIVATION_CHECK_SAMPLE). */
  allSkusWithoutBin: SkuWithoutBin[];
}

/** The check for `plan` (a row of the site). Reads the SKU master, open orders and both plans' bins. */
export async function computeActivationCheck(
  db: Knex,
  siteId: number,
  plan: DbFloorPlanRow,
  links: { xlsx: string; csv: string },
): Promise<FullActivationCheck> {
  const activeRow = await activePlanRow(db, siteId);
  const current = activeRow && activeRow.id !== plan.id ? activeRow : null;
  const [target, now, skus, orders, waves] = await Promise.all([
    slottingOf(db, plan.id),
    current ? slottingOf(db, current.id) : Promise.resolve(null),
    skuMap(db, siteId),
    openOrderLines(db, siteId),
    runningWaves(db, siteId, plan.id),
  ]);
  // With the plan itself active, "now" is the plan: nothing changes.
  const before = activeRow?.id === plan.id ? target : now;

  const without: SkuWithoutBin[] = [];
  for (const s of skus.values()) {
    if (target.onPlan.has(s.bin)) continue;
    without.push({ sku: s.sku, description: s.description, bin: s.bin, onCurrentPlan: before?.onPlan.has(s.bin) ?? false });
  }
  // Those losing their bin first: they are what the supervisor has to act on.
  without.sort((a, b) => Number(b.onCurrentPlan) - Number(a.onCurrentPlan) || a.sku.localeCompare(b.sku));

  const unplaceable: UnplaceableOrder[] = [];
  for (const [ref, lines] of orders) {
    const reason = unplaceableReason(lines, skus, target);
    if (reason) unplaceable.push({ ref, reason, placeableNow: unplaceableReason(lines, skus, before) === null });
  }
  unplaceable.sort((a, b) => Number(b.placeableNow) - Number(a.placeableNow) || a.ref.localeCompare(b.ref));

  const skusLosingBin = without.filter((s) => s.onCurrentPlan).length;
  const openOrdersLosingPlacement = unplaceable.filter((o) => o.placeableNow).length;
  return {
    plan: refOf(plan),
    currentPlan: current ? refOf(current) : null,
    skus: skus.size,
    skusWithoutBin: without.length,
    skusLosingBin,
    skusWithoutBinList: without.slice(0, ACTIVATION_CHECK_SAMPLE),
    skusWithoutBinDownload: links,
    openOrders: orders.size,
    openOrdersUnplaceable: unplaceable.length,
    openOrdersLosingPlacement,
    openOrdersUnplaceableList: unplaceable.slice(0, ACTIVATION_CHECK_SAMPLE),
    runningWaves: waves,
    needsAcknowledgement: skusLosingBin > 0 || openOrdersLosingPlacement > 0,
    allSkusWithoutBin: without,
  };
}

/** The answer as the API sends it (without the full list). */
export function publicCheck(full: FullActivationCheck): ActivationCheck {
  const { allSkusWithoutBin: _all, ...rest } = full;
  return rest;
}

const HEADER = ['sku', 'description', 'bin', 'bin_on_current_plan'] as const;
const cells = (s: SkuWithoutBin): string[] => [s.sku, s.description, s.bin, s.onCurrentPlan ? 'yes' : 'no'];

/** The SKUs without a bin as a workbook (one sheet `skus_without_bin`, every cell text). */
export function skusWithoutBinXlsx(rows: readonly SkuWithoutBin[]): Buffer {
  const ws = XLSX.utils.aoa_to_sheet(neutraliseCells([[...HEADER], ...rows.map(cells)]), { dense: true });
  ws['!cols'] = [{ wch: 16 }, { wch: 40 }, { wch: 16 }, { wch: 20 }];
  const wb = XLSX.utils.book_new();
  XLSX.utils.book_append_sheet(wb, ws, 'skus_without_bin');
  return XLSX.write(wb, { type: 'buffer', bookType: 'xlsx', compression: true }) as Buffer;
}

/** The same list as RFC 4180 CSV with a byte-order mark, formula-like cells neutralised. */
export function skusWithoutBinCsv(rows: readonly SkuWithoutBin[]): string {
  return csvDocument([[...HEADER], ...rows.map(cells)]);
}
