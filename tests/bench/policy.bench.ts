/**
 * Warehouse routing policies against the exact single-block optimum (Ratliff & Rosenthal): average and
 * worst % excess on generated trips of ≤ 12 stops, for S-shape, return, midpoint, largest gap, combined
 * and the tour engine's default (best construction + local improvement on the textbook block distances).
 * The target: the default within 0.5 % of exact on average. Then Ratliff & Rosenthal's time per
 * trip at 30 aisles × 50 stops.
 */
import { defaultClock } from '../../server/core/clock';
import { blockLayoutOf } from '../../server/core/policy/layout';
import { POLICIES } from '../../server/core/policy/policies';
import { ratliffRosenthal } from '../../server/core/policy/ratliff-rosenthal';
import type { PolicyResult, PolicyRoute, PolicyStop } from '../../server/core/policy/types';
import { isNotApplicable } from '../../server/core/policy/types';
import { createRng } from '../../server/core/rng';
import { heldKarp } from '../../server/core/tour/exact';
import { solveTour } from '../../server/core/tour/index';
import { blockMatrix, randomStops } from '../core/policy/helpers';

const TRIPS = 500;
const DEFAULT_TARGET_PCT = 0.5;
const DEFAULT_ROW = 'default (best + local)';

function route(r: PolicyResult): PolicyRoute {
  if (isNotApplicable(r)) throw new Error(r.reason);
  return r;
}

interface Row {
  sum: number;
  worst: number;
  optimal: number;
}

type Method = (stops: PolicyStop[]) => number;

/** Microseconds per trip for one method over all trips, timed as one loop (per-call clocks are too noisy). */
function timePerTrip(method: Method, trips: readonly PolicyStop[][]): number {
  let sink = 0;
  const t0 = defaultClock();
  for (const stops of trips) sink += method(stops);
  const us = (1000 * (defaultClock() - t0)) / trips.length;
  if (!(sink >= 0)) throw new Error('no lengths');
  return us;
}

function qualityTable(title: string, depotX: number, seed: number): void {
  const layout = blockLayoutOf({ aisles: 10, aisleSpacing: 3, aisleLength: 20, depotX });
  const rng = createRng(seed);
  const trips = Array.from({ length: TRIPS }, () => randomStops(rng, layout, 1 + rng.int(12)));
  const matrices = trips.map((stops) => blockMatrix(layout, depotX, stops));
  const methods = new Map<string, Method>();
  for (const [name, policy] of Object.entries(POLICIES)) methods.set(name, (stops) => route(policy(layout, depotX, stops)).length);
  const exactOf: Method = (stops) => route(ratliffRosenthal(layout, depotX, stops)).length;
  const rows = new Map<string, Row>();
  for (const name of [...methods.keys(), DEFAULT_ROW]) rows.set(name, { sum: 0, worst: 0, optimal: 0 });
  let hkDiff = 0;
  let stopsTotal = 0;
  const record = (name: string, length: number, exact: number): void => {
    const row = rows.get(name)!;
    const pct = exact > 0 ? (100 * (length - exact)) / exact : 0;
    row.sum += pct;
    row.worst = Math.max(row.worst, pct);
    if (pct < 1e-9) row.optimal++;
  };
  for (let t = 0; t < TRIPS; t++) {
    const stops = trips[t]!;
    stopsTotal += stops.length;
    const exact = exactOf(stops);
    hkDiff = Math.max(hkDiff, Math.abs(heldKarp(matrices[t]!).length - exact));
    for (const [name, method] of methods) record(name, method(stops), exact);
    record(DEFAULT_ROW, solveTour(matrices[t]!, { method: 'best', improve: 'local' }).length, exact);
  }
  const micros = new Map<string, number>();
  micros.set('exact', timePerTrip(exactOf, trips));
  for (const [name, method] of methods) micros.set(name, timePerTrip(method, trips));
  let k = 0;
  micros.set(
    DEFAULT_ROW,
    timePerTrip(() => solveTour(matrices[k++]!, { method: 'best', improve: 'local' }).length, trips),
  );

  console.log(`### ${title}`);
  console.log(
    `10 aisles 3 m apart, 20 m long, one block; ${TRIPS} trips of 1–12 stops (mean ${(stopsTotal / TRIPS).toFixed(1)}), uniform over aisles and depth, seed ${seed}.`,
  );
  console.log(`Ratliff–Rosenthal vs Held–Karp on the textbook distances: largest difference ${hkDiff.toExponential(1)} m.`);
  console.log('| method | mean % over exact | worst % | trips at exact | µs per trip |');
  console.log('|---|---|---|---|---|');
  console.log(`| ratliff-rosenthal (exact) | 0 | 0 | ${TRIPS} | ${micros.get('exact')!.toFixed(1)} |`);
  for (const [name, row] of rows) {
    const mean = row.sum / TRIPS;
    const target = name === DEFAULT_ROW ? ` (target ≤ ${DEFAULT_TARGET_PCT} %: ${mean <= DEFAULT_TARGET_PCT ? 'met' : 'NOT met'})` : '';
    console.log(`| ${name} | ${mean.toFixed(2)}${target} | ${row.worst.toFixed(1)} | ${row.optimal} | ${micros.get(name)!.toFixed(1)} |`);
  }
  console.log('(µs per trip: one timed loop per method over the same trips; the time of the default leaves out building its distance matrix.)');
  console.log('');
}

/** Runs every method on throw-away trips first, so the timed rows measure compiled code. */
function warmUp(): void {
  const layout = blockLayoutOf({ aisles: 10, aisleSpacing: 3, aisleLength: 20, depotX: 0 });
  const rng = createRng(1);
  let sink = 0;
  for (let t = 0; t < 1000; t++) {
    const stops = randomStops(rng, layout, 1 + rng.int(12));
    sink += route(ratliffRosenthal(layout, 0, stops)).length;
    for (const policy of Object.values(POLICIES)) sink += route(policy(layout, 0, stops)).length;
    sink += solveTour(blockMatrix(layout, 0, stops), { method: 'best', improve: 'local' }).length;
  }
  if (!(sink > 0)) throw new Error('warm-up produced no routes');
}

/** Multi-block S-shape against Held–Karp on the grid distances (no exact policy-type method there). */
function multiBlockTable(): void {
  const rng = createRng(2001);
  console.log('### S-shape with middle cross aisles (10 aisles 3 m apart, 30 m long), depot front left');
  console.log(`${TRIPS} trips of 1–12 stops per row; exact = Held–Karp on the shortest grid distances.`);
  console.log('| blocks | s-shape mean % over exact | worst % |');
  console.log('|---|---|---|');
  for (const blocks of [2, 3]) {
    const layout = blockLayoutOf({ aisles: 10, aisleSpacing: 3, aisleLength: 30, blocks, depotX: 0 });
    let sum = 0;
    let worst = 0;
    for (let t = 0; t < TRIPS; t++) {
      const stops = randomStops(rng, layout, 1 + rng.int(12));
      const exact = heldKarp(blockMatrix(layout, 0, stops)).length;
      const pct = (100 * (route(POLICIES['s-shape'](layout, 0, stops)).length - exact)) / exact;
      sum += pct;
      worst = Math.max(worst, pct);
    }
    console.log(`| ${blocks} | ${(sum / TRIPS).toFixed(2)} | ${worst.toFixed(1)} |`);
  }
  console.log('');
}

function speedTable(): void {
  const layout = blockLayoutOf({ aisles: 30, aisleSpacing: 3, aisleLength: 20, depotX: 0 });
  const rng = createRng(3050);
  const trips = Array.from({ length: 2000 }, () => randomStops(rng, layout, 50));
  let sink = 0;
  for (let i = 0; i < 200; i++) sink += route(ratliffRosenthal(layout, 0, trips[i]!)).length;
  const times: number[] = [];
  for (let run = 0; run < 5; run++) {
    const t0 = defaultClock();
    for (const stops of trips) sink += route(ratliffRosenthal(layout, 0, stops)).length;
    times.push((defaultClock() - t0) / trips.length);
  }
  times.sort((a, b) => a - b);
  console.log('### Ratliff–Rosenthal speed, 30 aisles × 50 stops');
  console.log('| measure | value |');
  console.log('|---|---|');
  console.log(
    `| time per trip (median of 5 runs × 2,000 trips) | ${(1000 * times[2]!).toFixed(1)} µs (runs ${times.map((t) => (1000 * t).toFixed(1)).join(', ')} µs) |`,
  );
  console.log(`(checksum ${sink.toFixed(0)})\n`);
}

export async function run(): Promise<void> {
  warmUp();
  qualityTable('Depot at the front of the first aisle', 0, 500);
  qualityTable('Depot at the front, centre (between aisles 5 and 6)', 13.5, 501);
  multiBlockTable();
  speedTable();
}
