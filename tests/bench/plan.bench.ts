/**
 * Floor-plan distances at warehouse size: walk graph + distance index build time and stored size
 * against the targets (50,000 bins: < 5 s, < 50 MB), and O(1) pair look-ups per second against
 * graphology-shortest-path's bidirectional Dijkstra on the same graph (a ratio; both answers compared).
 */
import { createRng } from '../../server/core/rng';
import { buildDistanceIndex, circuitPolyline, pairDistance } from '../../server/core/plan/distances';
import type { DistanceIndex } from '../../server/core/plan/distances';
import { generateRectangularPlan } from '../../server/core/plan/generate';
import type { RectangularPlanParams } from '../../server/core/plan/generate';
import type { PlanClosure } from '../../server/core/plan/types';
import { serializeDistanceIndex, serializeWalkGraph } from '../../server/core/plan/serialize';
import { NODE_ACCESS, NODE_DEPOT, buildWalkGraph, edgeCount } from '../../server/core/plan/walk-graph';
import type { WalkGraph } from '../../server/core/plan/walk-graph';
import { closeTo, referenceDistance, toGraphology } from '../core/plan/fixtures';

const BUILD_TARGET_MS = 5000;
const SIZE_TARGET_BYTES = 50 * 1024 * 1024;

interface Case {
  name: string;
  params: RectangularPlanParams;
  /** Random aisle closures (2 m each) to turn access points into hubs and cut chains. */
  closures?: number;
  /** Whether the issue's targets apply (the 50,000-bin plans). */
  targets: boolean;
}

const threeCrossAisles = { front: true, back: true, middle: 1 };
const cases: Case[] = [
  {
    name: '50k bins, 60 aisles × 105 bays × 4 levels × 2 sides',
    params: { aisles: 60, aisleLengthM: 140, aisleSpacingM: 3.2, baysPerAisle: 105, levels: 4, crossAisles: threeCrossAisles, depot: { at: 'front_centre' } },
    targets: true,
  },
  {
    name: '50k bins, 60 aisles × 417 bays × 1 level × 2 sides',
    params: { aisles: 60, aisleLengthM: 420, aisleSpacingM: 3.2, baysPerAisle: 417, levels: 1, crossAisles: threeCrossAisles, depot: { at: 'front_centre' } },
    targets: true,
  },
  {
    name: '50k bins, 60 aisles × 417 bays × 1 level, 120 random aisle closures',
    params: { aisles: 60, aisleLengthM: 420, aisleSpacingM: 3.2, baysPerAisle: 417, levels: 1, crossAisles: threeCrossAisles, depot: { at: 'front_centre' } },
    closures: 120,
    targets: true,
  },
  {
    name: '20k bins, 40 aisles × 50 bays × 5 levels × 2 sides',
    params: { aisles: 40, aisleLengthM: 70, aisleSpacingM: 3.2, baysPerAisle: 50, levels: 5, crossAisles: threeCrossAisles, depot: { at: 'front_left' } },
    targets: false,
  },
];

function stopNodes(g: WalkGraph): Int32Array {
  const out: number[] = [];
  for (let u = 0; u < g.nodeCount; u++) if (g.kind[u]! & (NODE_ACCESS | NODE_DEPOT)) out.push(u);
  return Int32Array.from(out);
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)]!;
}

const mb = (bytes: number): string => `${(bytes / 1024 / 1024).toFixed(2)} MB`;
const verdict = (ok: boolean): string => (ok ? 'PASS' : 'FAIL');

export async function run(): Promise<void> {
  for (const c of cases) {
    const plan = generateRectangularPlan(c.params);
    const crng = createRng(77);
    const closures: PlanClosure[] = [];
    for (let k = 0; k < (c.closures ?? 0); k++) {
      const a = plan.aisles[crng.int(plan.aisles.length)]!;
      const from = a.yStart + crng.next() * (a.yEnd - a.yStart);
      closures.push({ kind: 'aisle', code: a.code, from, to: from + 2 });
    }
    const times: number[] = [];
    let graph: WalkGraph | null = null;
    let index: DistanceIndex | null = null;
    for (let r = 0; r < 5; r++) {
      const t0 = performance.now();
      graph = buildWalkGraph(plan, closures);
      index = buildDistanceIndex(graph);
      times.push(performance.now() - t0);
    }
    const g = graph!;
    const ix = index!;
    const tg = performance.now();
    buildWalkGraph(plan, closures);
    const graphMs = performance.now() - tg;

    const bytes = serializeWalkGraph(g).byteLength + serializeDistanceIndex(ix).byteLength;
    const buildMs = median(times);

    // Look-ups between random access points and depots, same pairs for both methods.
    const nodes = stopNodes(g);
    const rng = createRng(2026);
    const PAIRS = 1 << 20;
    const pa = new Int32Array(PAIRS);
    const pb = new Int32Array(PAIRS);
    for (let i = 0; i < PAIRS; i++) {
      pa[i] = nodes[rng.int(nodes.length)]!;
      pb[i] = nodes[rng.int(nodes.length)]!;
    }
    let sink = 0;
    for (let i = 0; i < 10_000; i++) sink += Math.min(pairDistance(ix, pa[i]!, pb[i]!), 1e6);
    const tl = performance.now();
    for (let rep = 0; rep < 4; rep++) for (let i = 0; i < PAIRS; i++) sink += Math.min(pairDistance(ix, pa[i]!, pb[i]!), 1e6);
    const lookupMs = performance.now() - tl;
    const lookupsPerS = (4 * PAIRS) / (lookupMs / 1000);

    const ref = toGraphology(g);
    const REF_PAIRS = 100;
    let mismatches = 0;
    const tr = performance.now();
    for (let i = 0; i < REF_PAIRS; i++) {
      // Reference: graphology-shortest-path bidirectional Dijkstra on the same graph.
      const d = referenceDistance(ref, pa[i]!, pb[i]!);
      if (!closeTo(d, pairDistance(ix, pa[i]!, pb[i]!))) mismatches++;
    }
    const refMs = performance.now() - tr;
    const refPerS = REF_PAIRS / (refMs / 1000);

    // Drawing a 40-stop trip on the map: one shortest path per leg.
    const depot = g.depotNode[0]!;
    const circuit = [
      depot,
      ...Array.from(pa)
        .filter((u) => pairDistance(ix, depot, u) < Infinity)
        .slice(0, 39),
    ];
    const tp = performance.now();
    const slow = circuitPolyline(g, circuit);
    const polyDijkstraMs = performance.now() - tp;
    const tq = performance.now();
    const fast = circuitPolyline(g, circuit, true, ix);
    const polyIndexMs = performance.now() - tq;

    console.log(`### ${c.name}`);
    console.log(`bins ${plan.bins.length}, nodes ${g.nodeCount} (${nodes.length} access points + depots), edges ${edgeCount(g)}, hubs ${ix.hubCount}`);
    console.log('| measure | value | target |');
    console.log('|---|---|---|');
    console.log(
      `| build, graph + index (median of 5) | ${buildMs.toFixed(1)} ms (graph alone ${graphMs.toFixed(1)} ms; runs ${times.map((t) => t.toFixed(0)).join(', ')} ms) | ${c.targets ? `< 5 s: ${verdict(buildMs < BUILD_TARGET_MS)}` : '—'} |`,
    );
    console.log(`| serialised size, graph + index | ${mb(bytes)} (${bytes} B) | ${c.targets ? `< 50 MB: ${verdict(bytes < SIZE_TARGET_BYTES)}` : '—'} |`);
    console.log(`| pair look-ups (pairDistance) | ${(lookupsPerS / 1e6).toFixed(1)} M/s | O(1) |`);
    console.log(`| graphology bidirectional Dijkstra | ${refPerS.toFixed(1)} /s (${REF_PAIRS} pairs, ${mismatches} disagreeing) | reference |`);
    console.log(`| ratio | ${Math.round(lookupsPerS / refPerS).toLocaleString('en-US')} × | — |`);
    console.log(
      `| 40-stop route polyline | ${polyIndexMs.toFixed(2)} ms with the index, ${polyDijkstraMs.toFixed(1)} ms by Dijkstra per leg (${slow ? slow.length / 2 : 0} / ${fast ? fast.length / 2 : 0} points) | — |`,
    );
    console.log(`(checksum ${sink.toFixed(0)})\n`);
  }
}
