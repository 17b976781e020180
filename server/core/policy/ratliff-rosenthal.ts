/**
 * The shortest pick tour in a single-block parallel-aisle layout (front and back cross aisles), depot on
 * the front cross aisle, any number of stops: the dynamic programme of H. D. Ratliff & A. S. Rosenthal,
 * "Order-picking in a rectangular warehouse: a solvable case of the traveling salesman problem",
 * Operations Research 31(3):507–521, 1983.
 *
 * The tour is built as a multigraph on the front end a_j and back end b_j of every aisle j and on the
 * stops, column by column from left to right. After each column only an equivalence class of the partial
 * subgraph matters: the degree of a_j and of b_j (zero, even, odd) and whether they lie in one
 * connected component, in two, or the tour is already closed. Seven classes occur. Per aisle the
 * subgraph takes one of Ratliff & Rosenthal's vertical configurations (none, traverse once, traverse
 * twice, in and out from the front, in and out from the back, in and out from both ends leaving the
 * largest gap between neighbouring stops); between aisles one of five cross-aisle choices (no edge,
 * one front + one back, two front, two back, two front + two back). A depot that is not on an aisle's
 * centre line gets a column of its own with no aisle edges, where the tour must touch the front.
 *
 * The chosen configurations are traced back into an even, connected multigraph; an Eulerian circuit of
 * it from the depot is the walk, and the first visits along it give the stop order.
 */
import type { Clock } from '../clock';
import { defaultClock } from '../clock';
import type { BlockLayout } from './layout';
import { aisleLength, yOfDepth } from './layout';
import type { PathPoint, PolicyResult, PolicyStop } from './types';
import { isNotApplicable } from './types';
import { checkLayout, prepareStops } from './walk';

// Vertical configurations of one aisle (column).
const NONE = 0;
const TRAVERSE = 1;
const DOUBLE = 2;
const TOP = 3; // in and out from the front, up to the deepest stop
const BOTTOM = 4; // in and out from the back, down to the shallowest stop
const GAP = 5; // in and out from both ends, the largest gap between neighbouring stops unwalked
const CONFIGS = 6;
/** Degree added at a_j, degree added at b_j, whether the aisle joins a_j and b_j. */
const CFG_DA = [0, 1, 2, 2, 0, 2];
const CFG_DB = [0, 1, 2, 0, 2, 2];
const CFG_JOIN = [0, 1, 1, 0, 0, 0];

// Cross-aisle choices between neighbouring columns: copies of the front edge, copies of the back edge.
const TR_T = [0, 1, 2, 0, 2];
const TR_U = [0, 1, 0, 2, 2];
const TRANSITIONS = 5;

// Class of a partial subgraph: s = da·3 + db + 9·joined, da/db ∈ {0 zero, 1 even, 2 odd}; 0 = no edges.
const CLOSED = 18;
const STATES = 19;

function addDegree(c: number, delta: number): number {
  if (delta === 0) return c;
  return (c === 2) !== (delta % 2 === 1) ? 2 : 1;
}

function vertical(s: number, cfg: number): number {
  if (s === CLOSED) return cfg === NONE ? CLOSED : -1;
  const da = Math.floor((s % 9) / 3);
  const db = s % 3;
  const joined = s >= 9;
  const na = addDegree(da, CFG_DA[cfg]!);
  const nb = addDegree(db, CFG_DB[cfg]!);
  let nj = false;
  if (na > 0 && nb > 0) nj = CFG_JOIN[cfg] === 1 || (da > 0 && db > 0 && joined);
  return na * 3 + nb + (nj ? 9 : 0);
}

function horizontal(s: number, tr: number): number {
  const t = TR_T[tr]!;
  const u = TR_U[tr]!;
  if (s === CLOSED) return t === 0 && u === 0 ? CLOSED : -1;
  const da = Math.floor((s % 9) / 3);
  const db = s % 3;
  const joined = s >= 9;
  // a_j and b_j get no more edges after this step, so their degrees must end even.
  if ((da === 2) !== (t % 2 === 1) || (db === 2) !== (u % 2 === 1)) return -1;
  const cls = (k: number): number => (k === 0 ? 0 : k === 1 ? 2 : 1);
  const next = (j: boolean): number => cls(t) * 3 + cls(u) + (j ? 9 : 0);
  if (da === 0 && db === 0) return next(false);
  if (da > 0 && db > 0 && joined) return t === 0 && u === 0 ? CLOSED : next(t > 0 && u > 0);
  if (da > 0 && db > 0) return t > 0 && u > 0 ? next(false) : -1;
  // One component, through a_j only or b_j only: it must go on, or close with nothing else started.
  const goesOn = da > 0 ? t > 0 : u > 0;
  if (!goesOn) return t === 0 && u === 0 ? CLOSED : -1;
  return next(false);
}

const VERTICAL = new Int8Array(STATES * CONFIGS);
const HORIZONTAL = new Int8Array(STATES * TRANSITIONS);
for (let s = 0; s < STATES; s++) {
  for (let c = 0; c < CONFIGS; c++) VERTICAL[s * CONFIGS + c] = vertical(s, c);
  for (let tr = 0; tr < TRANSITIONS; tr++) HORIZONTAL[s * TRANSITIONS + tr] = horizontal(s, tr);
}

interface Column {
  x: number;
  /** The depot's own column: no aisle here, only the front point must be touched. */
  virtual: boolean;
  /** Depths to cover, ascending (stops, and 0 for a depot on this aisle). */
  need: number[];
  /** Distinct point depths of the column: 0, stop depths strictly inside, L. */
  points: number[];
  /** Stops at each point. */
  stopsAt: number[][];
  /** Index of the first stop of the largest gap between neighbouring needs (−1 if fewer than 2). */
  gapAt: number;
  cost: Float64Array;
}

export interface RatliffRosenthalOptions {
  clock?: Clock;
}

/** Same-position test for the depot and an aisle centre line. */
const SAME_X_M = 1e-9;

/** One column: its points, which stops sit at each, and the cost of every configuration (∞ = not allowed). */
function buildColumn(x: number, virtual: boolean, stopIdx: readonly number[], depotHere: boolean, depth: Float64Array, L: number): Column {
  const need: number[] = depotHere ? [0] : [];
  for (let k = 0; k < stopIdx.length; k++) need.push(depth[stopIdx[k]!]!);
  // Stops at depth 0 or L coincide with a_j or b_j; the others get one point per distinct depth.
  const points = [0];
  const stopsAt: number[][] = [[]];
  const atBack: number[] = [];
  for (let k = 0; k < stopIdx.length; k++) {
    const i = stopIdx[k]!;
    const d = depth[i]!;
    if (d >= L) {
      atBack.push(i);
      continue;
    }
    if (d > points[points.length - 1]!) {
      points.push(d);
      stopsAt.push([]);
    }
    stopsAt[points.length - 1]!.push(i);
  }
  points.push(L);
  stopsAt.push(atBack);
  let gapAt = -1;
  let gap = -1;
  for (let k = 0; k + 1 < need.length; k++) {
    if (need[k + 1]! - need[k]! > gap) {
      gap = need[k + 1]! - need[k]!;
      gapAt = k;
    }
  }
  const cost = new Float64Array(CONFIGS).fill(Infinity);
  if (virtual) {
    cost[TOP] = 0;
  } else if (need.length === 0) {
    cost[NONE] = 0;
    cost[TRAVERSE] = L;
    cost[DOUBLE] = 2 * L;
  } else {
    cost[TRAVERSE] = L;
    cost[DOUBLE] = 2 * L;
    cost[TOP] = 2 * need[need.length - 1]!;
    cost[BOTTOM] = 2 * (L - need[0]!);
    if (need.length >= 2) cost[GAP] = 2 * (L - gap);
  }
  return { x, virtual, need, points, stopsAt, gapAt, cost };
}

/**
 * Shortest closed walk from the depot (x = `depotX` on the front cross aisle) through every stop of a
 * single-block layout, back to the depot; `order` is the visiting order read off that walk, `path`
 * the walk itself. Time O(aisles + s log s) for s stops (19 classes × 6 configurations × 5 transitions
 * per aisle), memory O(aisles + s). `{ reason }` (no route) for a multi-block layout or a stop that does
 * not fit the layout. Ties between equally short tours go to the first found (configurations and
 * transitions in the order listed above, aisles left to right).
 */
export function ratliffRosenthal(layout: BlockLayout, depotX: number, stops: readonly PolicyStop[], options: RatliffRosenthalOptions = {}): PolicyResult {
  const clock = options.clock ?? defaultClock;
  const t0 = clock();
  const bad = checkLayout('ratliff-rosenthal', true, layout, depotX);
  if (bad) return bad;
  const prep = prepareStops(layout, stops);
  if (isNotApplicable(prep)) return prep;
  const L = aisleLength(layout);
  const X = layout.aisleX;

  // Columns: the aisles, plus the depot's own column when it is between (or outside) aisle centre lines.
  const cols: Column[] = [];
  const none: number[] = [];
  let depotCol = -1;
  let onAisle = -1;
  for (let a = 0; a < X.length; a++) if (Math.abs(X[a]! - depotX) <= SAME_X_M) onAisle = a;
  for (let a = 0; a < X.length; a++) {
    if (onAisle < 0 && depotCol < 0 && depotX < X[a]!) {
      depotCol = cols.length;
      cols.push(buildColumn(depotX, true, none, true, prep.depth, L));
    }
    if (a === onAisle) depotCol = cols.length;
    cols.push(buildColumn(X[a]!, false, prep.cells[a]!, a === onAisle, prep.depth, L));
  }
  if (depotCol < 0) {
    depotCol = cols.length;
    cols.push(buildColumn(depotX, true, none, true, prep.depth, L));
  }

  // Forward pass. backV[j][s+]: (s− << 3) | config; backH[j][s−]: (s+ of column j−1 << 3) | transition.
  const K = cols.length;
  const backV = new Int16Array(K * STATES).fill(-1);
  const backH = new Int16Array(K * STATES).fill(-1);
  let minus = new Float64Array(STATES).fill(Infinity);
  let spare = new Float64Array(STATES);
  const plus = new Float64Array(STATES);
  minus[0] = 0;
  for (let j = 0; j < K; j++) {
    const cost = cols[j]!.cost;
    plus.fill(Infinity);
    for (let s = 0; s < STATES; s++) {
      const base = minus[s]!;
      if (base === Infinity) continue;
      for (let c = 0; c < CONFIGS; c++) {
        const cc = cost[c]!;
        if (cc === Infinity) continue;
        const ns = VERTICAL[s * CONFIGS + c]!;
        if (ns >= 0 && base + cc < plus[ns]!) {
          plus[ns] = base + cc;
          backV[j * STATES + ns] = (s << 3) | c;
        }
      }
    }
    if (j === K - 1) break;
    const dx = cols[j + 1]!.x - cols[j]!.x;
    const next = spare;
    next.fill(Infinity);
    for (let s = 0; s < STATES; s++) {
      const base = plus[s]!;
      if (base === Infinity) continue;
      for (let tr = 0; tr < TRANSITIONS; tr++) {
        const ns = HORIZONTAL[s * TRANSITIONS + tr]!;
        if (ns < 0) continue;
        const v = base + (TR_T[tr]! + TR_U[tr]!) * dx;
        if (v < next[ns]!) {
          next[ns] = v;
          backH[(j + 1) * STATES + ns] = (s << 3) | tr;
        }
      }
    }
    spare = minus;
    minus = next;
  }
  let best = -1;
  for (let s = 0; s < STATES; s++) {
    if (HORIZONTAL[s * TRANSITIONS]! === CLOSED && plus[s]! < (best < 0 ? Infinity : plus[best]!)) best = s;
  }
  if (best < 0) throw new Error('internal: Ratliff–Rosenthal found no closed tour');
  const length = plus[best]!;

  // Trace back the configuration of every column and the transition after it.
  const cfgOf = new Int8Array(K);
  const trOf = new Int8Array(K);
  for (let j = K - 1, s = best; j >= 0; j--) {
    const v = backV[j * STATES + s]!;
    cfgOf[j] = v & 7;
    s = v >> 3;
    if (j > 0) {
      const h = backH[j * STATES + s]!;
      trOf[j - 1] = h & 7;
      s = h >> 3;
    }
  }

  const g = tourGraph(cols, cfgOf, trOf);
  const circuit = eulerCircuit(g, g.base[depotCol]!);
  const order: number[] = [];
  const seen = new Uint8Array(g.vertices);
  const path: PathPoint[] = new Array<PathPoint>(circuit.length);
  for (let k = 0; k < circuit.length; k++) {
    const v = circuit[k]!;
    const col = cols[g.colOf[v]!]!;
    const p = v - g.base[g.colOf[v]!]!;
    path[k] = { x: col.x, y: yOfDepth(layout, col.points[p]!) };
    if (seen[v]) continue;
    seen[v] = 1;
    const here = col.stopsAt[p]!;
    for (let q = 0; q < here.length; q++) order.push(here[q]!);
  }
  return { method: 'ratliff-rosenthal', order, length, path, ms: clock() - t0 };
}

interface TourGraph {
  vertices: number;
  /** First vertex id of each column (points in depth order), plus the total at the end. */
  base: Int32Array;
  colOf: Int32Array;
  eu: number[];
  ev: number[];
}

function addEdges(g: TourGraph, u: number, v: number, copies: number): void {
  for (let k = 0; k < copies; k++) {
    g.eu.push(u);
    g.ev.push(v);
  }
}

/** Edges between points `from`..`to` of the column starting at vertex `b0`, each `copies` times. */
function addAisle(g: TourGraph, b0: number, from: number, to: number, copies: number): void {
  for (let q = from; q < to; q++) addEdges(g, b0 + q, b0 + q + 1, copies);
}

/** The tour multigraph of the chosen configurations and transitions. O(points + edges). */
function tourGraph(cols: readonly Column[], cfgOf: Int8Array, trOf: Int8Array): TourGraph {
  const base = new Int32Array(cols.length + 1);
  for (let j = 0; j < cols.length; j++) base[j + 1] = base[j]! + cols[j]!.points.length;
  const vertices = base[cols.length]!;
  const colOf = new Int32Array(vertices);
  for (let j = 0; j < cols.length; j++) colOf.fill(j, base[j]!, base[j + 1]!);
  const g: TourGraph = { vertices, base, colOf, eu: [], ev: [] };
  for (let j = 0; j < cols.length; j++) {
    const col = cols[j]!;
    const top = col.points.length - 1;
    const b0 = base[j]!;
    switch (cfgOf[j]) {
      case TRAVERSE:
        addAisle(g, b0, 0, top, 1);
        break;
      case DOUBLE:
        addAisle(g, b0, 0, top, 2);
        break;
      case TOP:
        if (!col.virtual) addAisle(g, b0, 0, col.points.indexOf(col.need[col.need.length - 1]!), 2);
        break;
      case BOTTOM:
        addAisle(g, b0, col.points.indexOf(col.need[0]!), top, 2);
        break;
      case GAP:
        addAisle(g, b0, 0, col.points.indexOf(col.need[col.gapAt]!), 2);
        addAisle(g, b0, col.points.indexOf(col.need[col.gapAt + 1]!), top, 2);
        break;
      default:
        break;
    }
    if (j + 1 < cols.length) {
      addEdges(g, b0, base[j + 1]!, TR_T[trOf[j]!]!);
      addEdges(g, b0 + top, base[j + 2]! - 1, TR_U[trOf[j]!]!);
    }
  }
  return g;
}

/** Eulerian circuit from `start` by Hierholzer's algorithm, O(vertices + edges); vertex ids in walk order. */
function eulerCircuit(g: TourGraph, start: number): Int32Array {
  const nv = g.vertices;
  const ne = g.eu.length;
  const first = new Int32Array(nv + 1);
  for (let e = 0; e < ne; e++) {
    first[g.eu[e]! + 1]!++;
    first[g.ev[e]! + 1]!++;
  }
  for (let v = 0; v < nv; v++) first[v + 1]! += first[v]!;
  const adj = new Int32Array(2 * ne);
  const fill = first.slice(0, nv);
  for (let e = 0; e < ne; e++) {
    adj[fill[g.eu[e]!]!++] = e;
    adj[fill[g.ev[e]!]!++] = e;
  }
  const used = new Uint8Array(ne);
  const ptr = first.slice(0, nv);
  const stack = new Int32Array(ne + 1);
  const circuit = new Int32Array(ne + 1);
  let top = 0;
  let out = 0;
  stack[0] = start;
  while (top >= 0) {
    const v = stack[top]!;
    while (ptr[v]! < first[v + 1]! && used[adj[ptr[v]!]!]) ptr[v]!++;
    if (ptr[v]! < first[v + 1]!) {
      const e = adj[ptr[v]!]!;
      used[e] = 1;
      stack[++top] = g.eu[e] === v ? g.ev[e]! : g.eu[e]!;
    } else {
      circuit[out++] = v;
      top--;
    }
  }
  if (out !== ne + 1) throw new Error('internal: Ratliff–Rosenthal tour graph is not connected');
  return circuit.reverse();
}
