import { lockForTransaction } from '../db/dialect';
import type { Q } from '../db/knex';
import type { TripDetail, WaveDetail, WaveJob, WavePreview, WavePreviewBody, WaveSummary } from '../../shared/waves';
import { audit } from '../audit/audit';
import type { Deps } from '../deps';
import { loadPlanIndex, activePlanId } from '../floor-plans/plan-index';
import { getPlanRowById, loadGraphSets } from '../floor-plans/floor-plans.repository';
import { AppError, notFound } from '../http/errors';
import { linesOf, skuMap } from '../orders/orders.repository';
import { formatInZone } from '../../shared/time-zone';
import { getCartProfile, getSiteRow, settingsOf, siteTimeZone } from '../sites/sites.repository';
import { siteMembersWithRole } from '../users/users.repository';
import { jobStopMessage, runInWorker } from '../workers/spawn';
import { circuitPolyline } from '../core/plan/distances';
import type { PlannerOrder, PlannerOutput } from './wave-planner';
import type { PlanJobData } from './plan.worker';
import * as repo from './waves.repository';
import { lineView } from '../picking/picking.repository';
import type { JobContext, JobKind, JobRecord } from '../workers/jobs';
import { getPreview, toWaveJob, WAVE_PREVIEW_JOB, type PreviewJobData, type PreviewOutcome } from './preview-jobs';

const round = (v: number, d = 1) => Math.round(v * 10 ** d) / 10 ** d;
const pairs = (flat: number[]): [number, number][] => {
  const out: [number, number][] = [];
  for (let i = 0; i + 1 < flat.length; i += 2) out.push([round(flat[i]!, 2), round(flat[i + 1]!, 2)]);
  return out;
};

/** Heap cap of a planning process (MiB): the plan's distance index plus the wave's matrices. */
const PLAN_HEAP_MB = 1024;

/** Loads the chosen open orders with their lines slotted from the SKU master. */
async function plannerOrders(
  db: Q,
  siteId: number,
  orderIds: number[],
): Promise<{ orders: PlannerOrder[]; ids: Map<string, number>; unslotted: { order: string; reason: string }[] }> {
  const rows = await repo.ordersOfSite(db, siteId, orderIds);
  const missing = orderIds.filter((id) => !rows.some((r) => r.id === id));
  if (missing.length)
    throw new AppError('validation', 'unknown_orders', `Orders not found on this site: ${missing.slice(0, 10).join(', ')}`, [
      { field: 'orderIds', message: 'unknown order' },
    ]);
  const notOpen = rows.filter((r) => r.status !== 'open');
  if (notOpen.length)
    throw new AppError(
      'conflict',
      'orders_not_open',
      `Orders no longer open: ${notOpen
        .slice(0, 10)
        .map((r) => r.ref)
        .join(', ')}`,
      { orders: notOpen.map((r) => r.ref) },
    );
  const lines = await linesOf(
    db,
    rows.map((r) => r.id),
  );
  const skus = await skuMap(db, siteId);
  const orders: PlannerOrder[] = [];
  const unslotted: { order: string; reason: string }[] = [];
  const ids = new Map<string, number>();
  for (const r of rows) {
    ids.set(r.ref, r.id);
    const ls = lines.get(r.id) ?? [];
    const unknown = ls.filter((l) => !skus.has(l.sku)).map((l) => l.sku);
    if (unknown.length) {
      unslotted.push({ order: r.ref, reason: `SKU ${unknown.join(', ')} is not in the SKU master` });
      continue;
    }
    orders.push({
      ref: r.ref,
      due: r.due,
      priority: r.priority,
      lines: ls.map((l) => {
        const s = skus.get(l.sku)!;
        return { sku: l.sku, qty: l.qty, bin: s.bin, unitKg: s.unit_weight_kg, unitLitres: s.unit_volume_l };
      }),
    });
  }
  return { orders, ids, unslotted };
}

function toPreview(
  id: string,
  out: PlannerOutput,
  extra: { planId: number; planVersion: number; cart: WavePreview['cart']; body: WavePreviewBody; unslotted: { order: string; reason: string }[] },
): WavePreview {
  const r = out.result;
  return {
    previewId: id,
    planId: extra.planId,
    planVersion: extra.planVersion,
    cart: extra.cart,
    batching: extra.body.batching,
    method: extra.body.method,
    improve: extra.body.improve,
    trips: r.trips.map((t, i) => ({
      n: t.n,
      orders: t.orders.map((o) => ({ ref: o.ref, totes: o.totes })),
      stops: t.stops.map((s, k) => ({
        n: s.n,
        node: s.node,
        x: round(out.trips[i]!.stopXY[2 * k]!, 2),
        y: round(out.trips[i]!.stopXY[2 * k + 1]!, 2),
        bins: s.bins,
        lines: s.lines.length,
      })),
      lines: out.trips[i]!.lines,
      totes: t.totes,
      kg: round(t.kg, 2),
      litres: round(t.litres, 2),
      metres: round(t.metres),
      lowerBound: round(t.lowerBound),
      aboveBoundPct: round(t.aboveBoundPct, 2),
      sShapeMetres: t.sShapeMetres === null ? null : round(t.sShapeMetres),
      estMinutes: round(out.trips[i]!.estMinutes),
      path: pairs(out.trips[i]!.path),
      depot: [round(out.depot[0], 2), round(out.depot[1], 2)],
    })),
    totals: {
      trips: r.totals.trips,
      orders: r.totals.orders,
      lines: r.totals.lines,
      metres: round(r.totals.metres),
      lowerBound: round(r.totals.lowerBound),
      aboveBoundPct: round(r.totals.aboveBoundPct, 2),
      singleMetres: round(r.totals.singleMetres),
      savingVsSinglePct: round(r.totals.savingVsSinglePct, 2),
      sShapeMetres: r.totals.sShapeMetres === null ? null : round(r.totals.sShapeMetres),
      savingVsSShapePct: r.totals.savingVsSShapePct === null ? null : round(r.totals.savingVsSShapePct, 2),
      sShapeNote: r.totals.sShapeNote,
      estMinutes: round(out.estMinutes),
    },
    unplaced: [...extra.unslotted, ...out.unslotted, ...r.unplaced.map((u) => ({ order: u.order, reason: u.reason }))],
    notes: r.notes,
    ms: Math.round(r.ms),
  };
}

/**
 * Starts planning a wave preview as a job of the app's runner and returns the job at once; poll it for
 * progress. The wave is planned on the site's active plan. Everything is checked here first, so a
 * bad request is answered at once; the job reads its inputs again wherever it runs.
 */
export async function startPreview(deps: Deps, siteId: number, userId: number, body: WavePreviewBody): Promise<WaveJob> {
  const { db } = deps;
  const planId = await activePlanId(db, siteId);
  if (!planId) throw new AppError('conflict', 'no_active_plan', 'This site has no active floor plan; activate one first');
  const cart = await getCartProfile(db, siteId, body.cartProfileId);
  if (!cart) throw new AppError('validation', 'validation_failed', 'Unknown cart profile', [{ field: 'cartProfileId', message: 'unknown cart profile' }]);
  const plan = await loadPlanIndex(db, planId);
  if (body.depot >= plan.geometry.depots.length)
    throw new AppError('validation', 'validation_failed', `The plan has ${plan.geometry.depots.length} depot(s)`, [
      { field: 'depot', message: 'no such depot' },
    ]);
  await plannerOrders(db, siteId, body.orderIds);
  const data: PreviewJobData = { siteId, userId, planId, closureVersion: plan.closureVersion, cartProfileId: cart.id, body };
  return toWaveJob((await deps.jobs.submit(WAVE_PREVIEW_JOB, data, { siteId })) as JobRecord<PreviewOutcome>);
}

/** The job body of a wave preview: reads the plan, cart and orders, plans in a job process, answers the preview. */
async function runPreview(deps: Deps, d: PreviewJobData, job: JobContext): Promise<PreviewOutcome> {
  const { db } = deps;
  const { siteId, planId, body } = d;
  const cart = await getCartProfile(db, siteId, d.cartProfileId);
  if (!cart) throw new AppError('conflict', 'cart_gone', 'The cart profile was removed; plan the wave again');
  const site = (await getSiteRow(db, siteId))!;
  const plan = await loadPlanIndex(db, planId);
  const sets = await loadGraphSets(db, planId);
  if (!sets) throw new AppError('internal', 'plan_not_built', 'The active plan has no stored walk graph');
  if (sets.closureVersion !== d.closureVersion)
    throw new AppError('conflict', 'plan_changed', 'The floor plan changed while the wave waited to be planned; plan it again');
  const { orders, ids, unslotted } = await plannerOrders(db, siteId, body.orderIds);
  const planRow = (await getPlanRowById(db, planId))!;
  const data: PlanJobData = {
    geometry: plan.geometry,
    graph: sets.graph,
    index: sets.index,
    input: {
      orders,
      cart: { totes: cart.totes, maxKg: cart.maxKg, maxLitres: cart.maxLitres },
      batching: body.batching,
      method: body.method,
      improve: body.improve,
      depotIdx: body.depot,
      speeds: settingsOf(site),
      // No timeLimitMs: the wave builder's default (8 s, batching up to 40 % of it), the budget the
      // batching bench measures; a 20 s budget gave `search` 8 s and every preview took over 8 s.
      closures: plan.closures,
    },
  };
  job.progress(0, 'planning');
  const out = await runInWorker<PlannerOutput, number>(new URL('./plan.worker.ts', import.meta.url), data, {
    timeoutMs: 60_000,
    heapMb: PLAN_HEAP_MB,
    signal: job.signal,
    onProgress: (f) => job.progress(Math.min(0.99, f)),
  });
  const preview = toPreview(job.id, out, {
    planId,
    planVersion: planRow.version ?? 0,
    cart: { id: cart.id, name: cart.name, totes: cart.totes, maxKg: cart.maxKg, maxLitres: cart.maxLitres },
    body,
    unslotted,
  });
  return {
    preview,
    context: { siteId, planId, closureVersion: sets.closureVersion, userId: d.userId, depotIdx: body.depot, cartProfileId: cart.id },
    orderIds: [...ids],
  };
}

/** Wave previews as a job kind; one plans at a time per instance (two cores serve every request too). */
export function wavePreviewJob(deps: Deps): JobKind<PreviewJobData, PreviewOutcome> {
  return {
    name: WAVE_PREVIEW_JOB,
    run: (data, job) => runPreview(deps, data, job),
    describeFailure: (err) => jobStopMessage('Planning', err) ?? (err as Error).message,
    expireInSeconds: 5 * 60,
  };
}

/**
 * Releases a previewed wave: saves the wave, its trips, numbered stops and pick lines on the plan
 * it was planned on, and takes its orders out of the open pool — all in one transaction. The same
 * release key answers with the same wave (double click, retry).
 */
export async function releaseWave(deps: Deps, siteId: number, userId: number, previewId: string, releaseKey: string, name?: string): Promise<WaveDetail> {
  const { db } = deps;
  const existing = await repo.waveByReleaseKey(db, siteId, releaseKey);
  if (existing) return waveDetail(db, siteId, existing.id);
  const found = await getPreview(deps, siteId, previewId);
  if (!found) throw new AppError('not_found', 'preview_gone', 'This preview has expired or was never made; plan the wave again');
  const { preview, ctx } = found;
  if (preview.trips.length === 0) throw new AppError('validation', 'empty_wave', 'The preview has no trips to release', []);
  const plan = await getPlanRowById(db, ctx.planId);
  if (!plan || plan.state !== 'active' || plan.closure_version !== ctx.closureVersion) {
    throw new AppError('conflict', 'plan_changed', 'The floor plan changed since this preview (activated, closed or reopened an aisle); plan the wave again');
  }
  const site = (await getSiteRow(db, siteId))!;
  const speeds = settingsOf(site);
  const skus = await skuMap(db, siteId);
  const depotNode = (await loadPlanIndex(db, ctx.planId)).depotNodes[ctx.depotIdx]!;
  const now = new Date().toISOString();
  const waveName = name ?? `Wave ${now.slice(0, 16).replace('T', ' ')}`;

  const waveId = await db.transaction(async (trx) => {
    // One release per site at a time: the release key and the open orders are checked, then taken.
    await lockForTransaction(trx, `wave-release:${siteId}`);
    const again = await repo.waveByReleaseKey(trx, siteId, releaseKey);
    if (again) return again.id;
    const refs = preview.trips.flatMap((t) => t.orders.map((o) => o.ref));
    const orderIds = refs.map((r) => ctx.orderIds.get(r)!);
    const open = await repo.openOrderIds(trx, orderIds);
    if (open.length !== orderIds.length) {
      const gone = refs.filter((_r, i) => !open.includes(orderIds[i]!));
      throw new AppError('conflict', 'orders_not_open', `Orders already taken by another wave: ${gone.slice(0, 10).join(', ')}; plan again`, { orders: gone });
    }
    const t = preview.totals;
    const id = await repo.insertWave(trx, {
      site_id: siteId,
      plan_id: ctx.planId,
      name: waveName,
      status: 'released',
      cart_name: preview.cart.name,
      cart_totes: preview.cart.totes,
      cart_max_kg: preview.cart.maxKg,
      cart_max_litres: preview.cart.maxLitres,
      batching: preview.batching,
      routing_method: preview.method,
      routing_improve: preview.improve,
      depot_idx: ctx.depotIdx,
      orders_count: t.orders,
      lines_count: t.lines,
      planned_metres: t.metres,
      lower_bound_metres: t.lowerBound,
      single_metres: t.singleMetres,
      s_shape_metres: t.sShapeMetres,
      est_seconds: t.estMinutes * 60,
      notes: JSON.stringify(preview.notes),
      release_key: releaseKey,
      created_by: userId,
      created_at: now,
    });
    const lineRows = await linesOf(trx, orderIds);
    for (const trip of preview.trips) {
      const dues = await repo.dueDatesOf(
        trx,
        trip.orders.map((o) => ctx.orderIds.get(o.ref)!),
      );
      const tripId = await repo.insertTrip(trx, {
        wave_id: id,
        site_id: siteId,
        n: trip.n,
        status: 'released',
        planned_metres: trip.metres,
        lower_bound_metres: trip.lowerBound,
        s_shape_metres: trip.sShapeMetres,
        est_seconds: trip.estMinutes * 60,
        totes: trip.totes,
        kg: trip.kg,
        litres: trip.litres,
        depot_node: depotNode,
        due: dues[0] ?? null,
      });
      const toteOf = new Map<string, number>();
      for (const o of trip.orders) {
        await repo.insertTripOrder(trx, { trip_id: tripId, order_id: ctx.orderIds.get(o.ref), totes: JSON.stringify(o.totes) });
        toteOf.set(o.ref, o.totes[0]!);
      }
      // Lines per access point, in the order they were planned; an order's lines keep their line numbers.
      const used = new Set<number>();
      for (const s of trip.stops) {
        const stopId = await repo.insertStop(trx, { trip_id: tripId, n: s.n, node: s.node, x_m: s.x, y_m: s.y, bins: JSON.stringify(s.bins) });
        for (const o of trip.orders) {
          const orderId = ctx.orderIds.get(o.ref)!;
          for (const l of lineRows.get(orderId) ?? []) {
            const sku = skus.get(l.sku);
            if (!sku || !s.bins.includes(sku.bin) || used.has(l.id)) continue;
            used.add(l.id);
            await repo.insertPickLine(trx, {
              trip_id: tripId,
              stop_id: stopId,
              order_id: orderId,
              order_line_id: l.id,
              order_ref: o.ref,
              sku: l.sku,
              description: sku.description,
              bin: sku.bin,
              qty: l.qty,
              tote: toteOf.get(o.ref)!,
            });
          }
        }
      }
    }
    await repo.markOrdersPlanned(trx, orderIds, id);
    await audit(trx, {
      siteId,
      userId,
      action: 'wave.released',
      subject: String(id),
      detail: { trips: preview.trips.length, orders: orderIds.length, previewId },
    });
    return id;
  });

  const detail = await waveDetail(db, siteId, waveId);
  if (!existing) await mailReleaseSummary(deps, siteId, detail, speeds.walkingSpeedMps);
  return detail;
}

async function mailReleaseSummary(deps: Deps, siteId: number, w: WaveDetail, speed: number): Promise<void> {
  const supervisors = (await siteMembersWithRole(deps.db, siteId, 'supervisor')).filter((s) => s.email);
  const zone = await siteTimeZone(deps.db, siteId);
  const lines = [
    `${w.name} was released by ${w.createdBy ?? 'a supervisor'} at ${formatInZone(w.createdAt, zone)} (${zone}).`,
    '',
    `Trips: ${w.trips}   Orders: ${w.orders}   Lines: ${w.lines}`,
    `Planned walking: ${w.plannedMetres.toFixed(0)} m (≈ ${(w.plannedMetres / speed / 60).toFixed(0)} min at ${speed} m/s); estimated work ${w.estMinutes.toFixed(0)} min`,
    `One order per trip would walk ${w.singleMetres.toFixed(0)} m${w.sShapeMetres !== null ? `; S-shape routing ${w.sShapeMetres.toFixed(0)} m` : ''}.`,
    '',
    ...w.tripList.map(
      (t) => `Trip ${t.n}: ${t.orders.length} orders, ${t.stops} stops, ${t.lines} lines, ${t.plannedMetres.toFixed(0)} m, ≈ ${t.estMinutes.toFixed(0)} min`,
    ),
    '',
    'Routes are walking suggestions: site walkways, forklift traffic rules and lifting limits come first.',
  ];
  for (const s of supervisors) await deps.mailer.send({ to: s.email!, subject: `Released: ${w.name} (${w.trips} trips)`, text: lines.join('\n'), siteId });
}

const toSummary = (w: repo.DbWaveListRow): WaveSummary => ({
  id: w.id,
  name: w.name,
  status: w.status,
  planId: w.plan_id,
  planVersion: w.plan_version ?? 0,
  cartName: w.cart_name,
  batching: w.batching,
  method: w.routing_method,
  improve: w.routing_improve,
  trips: w.trips_count,
  orders: w.orders_count,
  lines: w.lines_count,
  plannedMetres: w.planned_metres,
  singleMetres: w.single_metres,
  sShapeMetres: w.s_shape_metres,
  lowerBoundMetres: w.lower_bound_metres,
  estMinutes: Math.round(w.est_seconds / 6) / 10,
  createdAt: w.created_at,
  createdBy: w.creator,
  completedAt: w.completed_at,
});

export async function listWaves(db: Q, siteId: number, status?: WaveSummary['status']): Promise<WaveSummary[]> {
  return (await repo.listWaveRows(db, siteId, status)).map(toSummary);
}

async function tripSummaries(db: Q, where: Record<string, unknown>) {
  const { trips, orders, counts } = await repo.tripRows(db, where);
  return trips.map((t) => {
    const c = counts.find((x) => x.trip_id === t.id);
    return {
      ...repo.tripHead(t),
      orders: orders.filter((o) => o.trip_id === t.id).map((o) => o.ref),
      stops: Number(c?.stops ?? 0),
      lines: Number(c?.lines ?? 0),
      plannedMetres: t.planned_metres,
      lowerBoundMetres: t.lower_bound_metres,
      estMinutes: Math.round(t.est_seconds / 6) / 10,
      totes: t.totes,
      kg: t.kg,
      litres: t.litres,
    };
  });
}

export async function waveDetail(db: Q, siteId: number, waveId: number): Promise<WaveDetail> {
  const w = await repo.getWaveListRow(db, siteId, waveId);
  if (!w) throw notFound('Wave');
  return { ...toSummary(w), notes: JSON.parse(w.notes) as string[], tripList: await tripSummaries(db, { 'trips.wave_id': waveId }) };
}

/** A trip with its stops, pick lines and the route to draw, as the print view and the tablet show it. */
export async function tripDetail(db: Q, siteId: number, tripId: number): Promise<TripDetail> {
  const [summary] = await tripSummaries(db, { 'trips.id': tripId, 'trips.site_id': siteId });
  if (!summary) throw notFound('Trip');
  const wave = (await repo.waveOfTrip(db, tripId))!;
  const site = (await getSiteRow(db, siteId))!;
  const { stops, lines } = await repo.printStopsAndLines(db, tripId);
  const plan = await loadPlanIndex(db, wave.plan_id);
  const depotNode = plan.depotNodes[wave.depot_idx]!;
  const poly = circuitPolyline(plan.graph, [depotNode, ...stops.map((s) => s.node)], true, plan.index);
  return {
    ...summary,
    waveId: wave.id,
    waveName: wave.name,
    planId: wave.plan_id,
    siteName: site.name,
    depotCode: plan.geometry.depots[wave.depot_idx]?.code ?? 'depot',
    depot: [plan.graph.x[depotNode]!, plan.graph.y[depotNode]!],
    path: poly ? pairs(Array.from(poly)) : [],
    stopList: stops.map((s) => ({
      id: s.id,
      n: s.n,
      x: s.x_m,
      y: s.y_m,
      bins: JSON.parse(s.bins) as string[],
      status: s.status,
      lines: lines.filter((l) => l.stop_id === s.id).map(lineView),
    })),
  };
}

/** Cancels a wave that no picker has started: its orders go back to the open pool. */
export async function cancelWave(deps: Deps, siteId: number, userId: number, waveId: number): Promise<WaveDetail> {
  await deps.db.transaction(async (trx) => {
    const w = await repo.waveOfSite(trx, siteId, waveId);
    if (!w) throw notFound('Wave');
    if (w.status !== 'released')
      throw new AppError('conflict', 'wave_started', 'Picking has started on this wave; cancel its trips from the live board instead');
    if ((await repo.recordedLineCount(trx, waveId)) > 0)
      throw new AppError('conflict', 'wave_started', 'Lines of this wave are already picked; cancel its trips from the live board instead');
    await repo.cancelWaveRows(trx, siteId, waveId);
    await audit(trx, { siteId, userId, action: 'wave.cancelled', subject: String(waveId) });
  });
  return waveDetail(deps.db, siteId, waveId);
}
