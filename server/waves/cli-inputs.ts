/**
 * Files → engine inputs for `aislewright waves plan`: the floor-plan workbook through the floor-plan
 * import's checker, the SKU master and orders through the shared safe table reader and row checks,
 * then each order line slotted to its bin's access point. Nothing here parses a spreadsheet itself.
 */
import type { RowIssue } from '../../shared/imports';
import type { Order, Unplaced } from '../core/batch/types';
import type { PolicyComparison } from '../core/batch/plan-wave';
import type { PlanGeometry } from '../core/plan/types';
import type { WalkGraph } from '../core/plan/walk-graph';
import { isNotApplicable } from '../core/policy/index';
import { buildSiteModel, slotOrders, type SiteModel } from '../core/site/index';
import { checkFloorPlanFile } from '../floor-plans/import/index';
import { readTableFile } from '../orders/orders.files';
import { validateOrderRows, validateSkuRows, type SkuRecord } from '../orders/orders.validate';

export interface NamedFile {
  bytes: Uint8Array;
  /** File name; its extension tells xlsx from CSV. */
  name: string;
}

export interface WaveInputFiles {
  plan: NamedFile;
  skus: NamedFile;
  orders: NamedFile;
}

export interface WaveInputs {
  plan: PlanGeometry;
  graph: WalkGraph;
  depotNode: number;
  distance: (a: number, b: number) => number;
  /** Orders whose every line is slotted on the plan, in file order. */
  orders: Order[];
  /** Orders left out before batching (a SKU's bin not on the plan), with the reason. */
  unplaced: Unplaced[];
  /** The S-shape comparison, or why the plan has none. */
  policy: PolicyComparison | { reason: string };
}

export type WaveInputsResult = ({ ok: true } & WaveInputs) | { ok: false; file: 'plan' | 'skus' | 'orders'; errors: RowIssue[] };

export interface SiteFiles {
  /** The plan as a site model, for the depot trips start from. */
  site: SiteModel;
  plan: PlanGeometry;
  graph: WalkGraph;
  depotIndex: number;
  depotNode: number;
  distance: (a: number, b: number) => number;
  /** The SKU master as read, in file order. */
  skuRecords: SkuRecord[];
  skus: Map<string, SkuRecord>;
}

export type SiteFilesResult = ({ ok: true } & SiteFiles) | { ok: false; file: 'plan' | 'skus'; errors: RowIssue[] };

/**
 * Reads and checks a floor-plan workbook and a SKU master, and builds the walk graph and distances
 * with the depot trips start from (default: the plan's first). Stops at the first file with problems.
 */
export async function readSiteFiles(files: { plan: NamedFile; skus: NamedFile }, options: { depot?: string } = {}): Promise<SiteFilesResult> {
  const checked = await checkFloorPlanFile(files.plan.bytes, files.plan.name);
  if (!checked.ok || !checked.plan) return { ok: false, file: 'plan', errors: checked.errors };
  const plan = checked.plan as PlanGeometry;

  const skuRead = await readTableFile(files.skus.bytes, files.skus.name, 'skus');
  if ('issues' in skuRead) return { ok: false, file: 'skus', errors: skuRead.issues };
  const skuCheck = validateSkuRows('skus', skuRead.rows);
  if (skuCheck.errors.length > 0) return { ok: false, file: 'skus', errors: skuCheck.errors };

  const depotIndex = options.depot === undefined ? 0 : plan.depots.findIndex((d) => d.code === options.depot);
  if (depotIndex < 0 || !plan.depots[depotIndex]) {
    const message = options.depot === undefined ? 'the plan has no depot' : `the plan has no depot ${options.depot}`;
    return { ok: false, file: 'plan', errors: [{ sheet: 'depots', row: null, column: 'depot', value: options.depot ?? null, message }] };
  }
  const site = buildSiteModel({ geometry: plan, depotIdx: depotIndex });
  return {
    ok: true,
    site,
    plan,
    graph: site.graph,
    depotIndex,
    depotNode: site.depotNode,
    distance: site.distance,
    skuRecords: skuCheck.skus,
    skus: new Map(skuCheck.skus.map((s) => [s.sku, s])),
  };
}

/**
 * Reads and checks the three files, stopping at the first file with problems (its whole error table
 * is returned). `depot` names the depot trips start from (default: the plan's first).
 */
export async function readWaveInputs(files: WaveInputFiles, options: { depot?: string } = {}): Promise<WaveInputsResult> {
  const site = await readSiteFiles(files, options);
  if (!site.ok) return site;
  const { plan, graph, skus } = site;

  const orderRead = await readTableFile(files.orders.bytes, files.orders.name, 'orders');
  if ('issues' in orderRead) return { ok: false, file: 'orders', errors: orderRead.issues };
  const orderCheck = validateOrderRows('orders', orderRead.rows, (sku) => skus.has(sku));
  if (orderCheck.errors.length > 0) return { ok: false, file: 'orders', errors: orderCheck.errors };

  const slotted = slotOrders(
    site.site,
    orderCheck.orders.map((rec) => ({
      ref: rec.ref,
      due: rec.due,
      priority: rec.priority,
      lines: rec.lines.map((l) => {
        const sku = skus.get(l.sku)!;
        return { sku: l.sku, qty: l.qty, bin: sku.bin, unitKg: sku.unitWeightKg, unitLitres: sku.unitVolumeL };
      }),
    })),
  );
  const orders: Order[] = slotted.orders;
  // A bin not on the plan or off its walk graph is a bad line of the order; an unreachable one keeps its code.
  const unplaced: Unplaced[] = slotted.unslotted.map((u) => ({
    order: u.order,
    code: u.code === 'unreachable' ? 'unreachable' : 'bad_line',
    reason: u.reason,
  }));
  const layout = site.site.layout;
  return {
    ok: true,
    plan,
    graph,
    depotNode: site.depotNode,
    distance: site.distance,
    orders,
    unplaced,
    policy: isNotApplicable(layout) ? { reason: layout.reason } : { layout, stopOf: site.site.stopOf },
  };
}
