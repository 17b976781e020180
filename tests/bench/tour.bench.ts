/**
 * Tour engine benchmark: every construction × none/local and deep (1 s) on the TSPLIB reference
 * instances (published optima, Reinelt 1991), the default method against Held–Karp on generated
 * single-block trips, the speed targets of the tour issue, and salesman.js (simulated annealing,
 * from the registry) side by side on the same instances.
 */
import { createRequire } from 'node:module';
import { availableParallelism, loadavg } from 'node:os';
import type { DistanceMatrix } from '../../server/core/matrix';
import { circuitLength, matrixFromFunction } from '../../server/core/matrix';
import { createRng } from '../../server/core/rng';
import type { ImproveMode, TourMethod } from '../../server/core/tour/index';
import { heldKarp, heldKarpBound, solveTour } from '../../server/core/tour/index';
import { randomEuclidean } from '../helpers/instances';
import type { TsplibInstance } from '../helpers/tsplib';
import { loadTsp, TSPLIB_OPTIMA } from '../helpers/tsplib';

interface SalesmanPoint {
  x: number;
  y: number;
}
const salesman = createRequire(import.meta.url)('salesman.js') as {
  solve(points: SalesmanPoint[], tempCoeff?: number): number[];
  Point: new (x: number, y: number) => SalesmanPoint;
};

const NAMES = Object.keys(TSPLIB_OPTIMA);
const DEEP_MS = 1000;

const pct = (len: number, opt: number): number => 100 * (len / opt - 1);
const f1 = (x: number): string => x.toFixed(1);
const f2 = (x: number): string => x.toFixed(2);
const mean = (v: number[]): number => v.reduce((a, b) => a + b, 0) / v.length;
const median = (v: number[]): number => {
  const s = [...v].sort((a, b) => a - b);
  return s.length % 2 ? s[s.length >> 1]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2;
};

function table(head: string[], rows: string[][]): string {
  const w = head.map((h, i) => Math.max(h.length, ...rows.map((r) => r[i]!.length)));
  const line = (r: string[]): string => `| ${r.map((c, i) => (i === 0 ? c.padEnd(w[i]!) : c.padStart(w[i]!))).join(' | ')} |`;
  return [line(head), `|${w.map((x, i) => (i === 0 ? `:${'-'.repeat(x + 1)}` : `${'-'.repeat(x + 1)}:`)).join('|')}|`, ...rows.map(line)].join('\n');
}

/** Median wall time of `reps` runs (machine is shared; the median resists other engineers' load). */
function timed<T>(reps: number, f: () => T): { value: T; ms: number } {
  let value = f();
  const times: number[] = [];
  for (let r = 0; r < reps; r++) {
    const t0 = performance.now();
    value = f();
    times.push(performance.now() - t0);
  }
  return { value, ms: median(times) };
}

/**
 * salesman.js computes its own planar distances, so GEO instances are handed to it through an
 * equirectangular projection (x = longitude·cos(mean latitude), y = latitude); every returned order is
 * measured with the TSPLIB distance function.
 */
function salesmanPoints(inst: TsplibInstance): SalesmanPoint[] {
  if (inst.type !== 'GEO') return inst.coords.map(([x, y]) => new salesman.Point(x, y));
  const deg = (v: number): number => Math.trunc(v) + (5 * (v - Math.trunc(v))) / 3;
  const lat0 = mean(inst.coords.map(([la]) => deg(la))) * (Math.PI / 180);
  return inst.coords.map(([la, lo]) => new salesman.Point(deg(lo) * Math.cos(lat0), deg(la)));
}

interface Row {
  name: string;
  length: number;
  excess: number;
  ms: number;
}

const COMBOS: [TourMethod, ImproveMode][] = [
  ['nearest-neighbor', 'none'],
  ['nearest-neighbor', 'local'],
  ['repeated-nearest-neighbor', 'none'],
  ['repeated-nearest-neighbor', 'local'],
  ['sorted-edges', 'none'],
  ['sorted-edges', 'local'],
  ['best', 'none'],
  ['best', 'local'],
];

/**
 * Single-block layout (textbook formula, e.g. Bartholdi & Hackman, Warehouse & Distribution Science):
 * same aisle |y1 − y2|, else |x1 − x2| + min(y1 + y2, 2L − y1 − y2).
 */
function singleBlockTrip(stops: number, seed: number): DistanceMatrix {
  const rng = createRng(seed);
  const aisles = 10;
  const pitch = 3;
  const L = 30;
  // Depot at the front cross aisle in front of the first aisle; stops at random aisle positions.
  const pts: [number, number, number][] = [[0, 0, -1]];
  for (let s = 0; s < stops; s++) {
    const a = rng.int(aisles);
    pts.push([a * pitch, rng.next() * L, a]);
  }
  return matrixFromFunction(pts.length, (i, j) => {
    const [x1, y1, a1] = pts[i]!;
    const [x2, y2, a2] = pts[j]!;
    if (a1 === a2 && a1 >= 0) return Math.abs(y1 - y2);
    return Math.abs(x1 - x2) + Math.min(y1 + y2, 2 * L - y1 - y2);
  });
}

export async function run(): Promise<void> {
  const started = performance.now();
  const load = loadavg()
    .map((x) => x.toFixed(1))
    .join(' / ');
  console.log(`machine: ${availableParallelism()} cores, load average ${load} (1 / 5 / 15 min) at start; ms are wall time\n`);
  const instances = NAMES.map((n) => loadTsp(n));
  const results = new Map<string, Row[]>();
  const key = (m: string, i: string): string => `${m} + ${i}`;

  for (const [method, improve] of COMBOS) {
    const rows: Row[] = [];
    for (const inst of instances) {
      const opt = TSPLIB_OPTIMA[inst.name]!;
      const { value, ms } = timed(5, () => solveTour(inst.matrix, { method, improve, timeLimitMs: 2000 }));
      rows.push({ name: inst.name, length: value.length, excess: pct(value.length, opt), ms });
    }
    results.set(key(method, improve), rows);
  }
  const overshoots: number[] = [];
  const deepRowsOf = new Map<TourMethod, Row[]>();
  for (const method of ['nearest-neighbor', 'repeated-nearest-neighbor', 'sorted-edges', 'best'] as TourMethod[]) {
    const rows: Row[] = [];
    for (const inst of instances) {
      const r = solveTour(inst.matrix, { method, improve: 'deep', timeLimitMs: DEEP_MS, seed: 1 });
      overshoots.push(r.ms - DEEP_MS);
      rows.push({ name: inst.name, length: r.length, excess: pct(r.length, TSPLIB_OPTIMA[inst.name]!), ms: r.ms });
    }
    deepRowsOf.set(method, rows);
    results.set(key(method, `deep ${DEEP_MS / 1000} s`), rows);
  }
  const deepRows = deepRowsOf.get('best')!;
  const exactRows: Row[] = [];
  for (const inst of instances.filter((i) => i.matrix.n <= 17)) {
    const { value, ms } = timed(3, () => solveTour(inst.matrix, { method: 'exact' }));
    exactRows.push({ name: inst.name, length: value.length, excess: pct(value.length, TSPLIB_OPTIMA[inst.name]!), ms });
  }
  results.set(key('exact', 'none (≤ 16 stops)'), exactRows);

  console.log('### TSPLIB: length, % above the published optimum, ms (median of 5; deep: one seeded run)\n');
  for (const [name, rows] of results) {
    console.log(`**${name}**\n`);
    const body = rows.map((r) => [r.name, String(r.length), f2(r.excess), f2(r.ms)]);
    body.push(['average', '', f2(mean(rows.map((r) => r.excess))), f2(mean(rows.map((r) => r.ms)))]);
    console.log(table(['instance', 'length', '% above opt', 'ms'], body));
    console.log('');
  }

  console.log('### TSPLIB summary (% above optimum per instance; last columns: average and worst)\n');
  console.log(
    table(
      ['method', ...NAMES, 'avg %', 'worst %', 'avg ms'],
      [...results].map(([name, rows]) => {
        const byName = new Map(rows.map((r) => [r.name, r]));
        return [
          name,
          ...NAMES.map((n) => (byName.has(n) ? f1(byName.get(n)!.excess) : '—')),
          f2(mean(rows.map((r) => r.excess))),
          f2(Math.max(...rows.map((r) => r.excess))),
          f1(mean(rows.map((r) => r.ms))),
        ];
      }),
    ),
  );

  console.log('\n### Held–Karp 1-tree bound (1 s budget)\n');
  const boundRows = instances.map((inst) => {
    const b = heldKarpBound(inst.matrix, { timeLimitMs: 1000 });
    const opt = TSPLIB_OPTIMA[inst.name]!;
    return [inst.name, String(opt), String(b.lowerBound), f2(100 * (1 - b.lowerBound / opt)), String(b.iterations), f1(b.ms)];
  });
  console.log(table(['instance', 'optimum', 'lower bound', '% below opt', 'iterations', 'ms'], boundRows));

  // Generated single-block trips: the default method against the exact optimum.
  const sbExcess: number[] = [];
  let sbWorst = 0;
  for (let stops = 2; stops <= 12; stops++) {
    for (let t = 0; t < 60; t++) {
      const m = singleBlockTrip(stops, 1000 * stops + t);
      const def = solveTour(m, { method: 'best', improve: 'local' }).length;
      const ex = heldKarp(m).length;
      const e = ex > 0 ? pct(def, ex) : 0;
      sbExcess.push(e);
      sbWorst = Math.max(sbWorst, e);
    }
  }

  // Speed: 100-stop trips with the default method, and 1,000 trips of 30 stops.
  const t100: number[] = [];
  for (let s = 0; s < 30; s++) {
    const m = randomEuclidean(101, 500 + s);
    t100.push(solveTour(m, { method: 'best', improve: 'local' }).ms);
  }
  const trips30 = Array.from({ length: 1000 }, (_, s) => randomEuclidean(31, 9000 + s));
  const tBatch0 = performance.now();
  const cpu0 = process.cpuUsage();
  let sum30 = 0;
  for (const m of trips30) sum30 += solveTour(m, { method: 'best', improve: 'local' }).length;
  const tBatch = performance.now() - tBatch0;
  const cpuUse = process.cpuUsage(cpu0);
  const cpuBatch = (cpuUse.user + cpuUse.system) / 1000;

  const local = results.get(key('best', 'local'))!;
  const deep = deepRows;
  const pf = (ok: boolean): string => (ok ? 'pass' : 'FAIL');
  const avgLocal = mean(local.map((r) => r.excess));
  const avgDeep = mean(deep.map((r) => r.excess));
  const worstDeep = Math.max(...deep.map((r) => r.excess));
  console.log('\n### Targets (tour issue)\n');
  console.log(
    table(
      ['target', 'measured', 'result'],
      [
        ['best + local on TSPLIB: average ≤ 3 % above optimum', `${f2(avgLocal)} %`, pf(avgLocal <= 3)],
        [`deep ${DEEP_MS / 1000} s on TSPLIB: average ≤ 1 %`, `${f2(avgDeep)} %`, pf(avgDeep <= 1)],
        [`deep ${DEEP_MS / 1000} s on TSPLIB: worst ≤ 2 %`, `${f2(worstDeep)} %`, pf(worstDeep <= 2)],
        [
          'single-block trips of 2–12 stops (660): default within 0.5 % of exact on average',
          `${f2(mean(sbExcess))} % (worst ${f2(sbWorst)} %)`,
          pf(mean(sbExcess) <= 0.5),
        ],
        ['100-stop trip, default method: < 20 ms (median of 30 random trips)', `${f2(median(t100))} ms (max ${f2(Math.max(...t100))})`, pf(median(t100) < 20)],
        ['1,000 trips of 30 stops, default method: < 2 s', `${f1(tBatch)} ms wall, ${f1(cpuBatch)} ms CPU (Σ length ${f1(sum30)})`, pf(tBatch < 2000)],
        [
          `deep (${overshoots.length} runs of ${DEEP_MS} ms) never more than 5 ms over its budget`,
          `median ${f2(median(overshoots))} ms, worst ${f2(Math.max(...overshoots))} ms, ${overshoots.filter((o) => o > 5).length} over 5 ms`,
          pf(Math.max(...overshoots) <= 5),
        ],
      ],
    ),
  );

  // Side by side with salesman.js (simulated annealing, default cooling; unseeded Math.random).
  console.log('\n### Side by side with salesman.js 2.0.4 (simulated annealing; median of 3 runs)\n');
  const cmp: string[][] = [];
  const ratios = { defLen: [] as number[], defMs: [] as number[], deepLen: [] as number[] };
  for (const inst of instances) {
    const opt = TSPLIB_OPTIMA[inst.name]!;
    const pts = salesmanPoints(inst);
    const runs = Array.from({ length: 3 }, () => {
      const t0 = performance.now();
      const order = salesman.solve(pts);
      return { ms: performance.now() - t0, len: circuitLength(inst.matrix, order) };
    });
    const saLen = median(runs.map((r) => r.len));
    const saMs = median(runs.map((r) => r.ms));
    const def = local.find((r) => r.name === inst.name)!;
    const dp = deep.find((r) => r.name === inst.name)!;
    ratios.defLen.push(def.length / saLen);
    ratios.defMs.push(def.ms / saMs);
    ratios.deepLen.push(dp.length / saLen);
    cmp.push([
      inst.name,
      `${f1(saLen)} (${f1(pct(saLen, opt))} %)`,
      f1(saMs),
      `${def.length} (${f1(def.excess)} %)`,
      f2(def.ms),
      f2(def.length / saLen),
      (def.ms / saMs).toPrecision(2),
      f2(dp.length / saLen),
    ]);
  }
  cmp.push(['average', '', '', '', '', f2(mean(ratios.defLen)), mean(ratios.defMs).toPrecision(2), f2(mean(ratios.deepLen))]);
  console.log(
    table(
      [
        'instance',
        'salesman.js length',
        'SA ms',
        'default (best + local)',
        'ms',
        'length ratio (default / SA)',
        'time ratio (default / SA)',
        `length ratio (best + deep ${DEEP_MS / 1000} s / SA)`,
      ],
      cmp,
    ),
  );
  console.log(`\ntour bench total ${f1((performance.now() - started) / 1000)} s`);
}
