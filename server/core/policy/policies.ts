/**
 * Warehouse routing policies on parallel-aisle block layouts: S-shape (traversal) for any number of
 * blocks, and return, midpoint, largest gap and combined for single-block layouts.
 *
 * Definitions: R. W. Hall, "Distance approximations for routing manual pickers in a warehouse", IIE
 * Transactions 25(4), 1993 (traversal, return, midpoint, largest gap); K. J. Roodbergen & R. de Koster,
 * "Routing methods for warehouses with multiple cross aisles", IJPR 39(9), 2001 (multi-block S-shape,
 * combined).
 *
 * Conventions common to all of them:
 * - The depot is a point on the front cross aisle (depth 0) at x = `depotX`; lengths run from that point
 *   and back to it. A stop is on its aisle's centre line; walking is along aisle and cross-aisle centre
 *   lines only, so every length is a sum of |Δx| and |Δdepth|.
 * - "Left" is lower x. Every policy starts at the leftmost pick aisle and works rightwards, whatever the
 *   depot's x (in one block the cross-aisle travel is the same either way; only which aisle gets S-shape's
 *   odd-count return changes).
 * - Stops in one aisle are picked in walking order; equal positions by stop index.
 * - O(s log s + aisles · blocks) time for s stops; each returns a `PolicyRoute` or, when the layout or
 *   a stop does not fit the policy, `{ reason }` (no route).
 */
import type { Clock } from '../clock';
import { defaultClock } from '../clock';
import type { BlockLayout } from './layout';
import { aisleLength } from './layout';
import type { PolicyName, PolicyResult, PolicyStop } from './types';
import { isNotApplicable } from './types';
import type { PreparedStops } from './walk';
import { checkLayout, prepareStops, Walk } from './walk';

export interface PolicyOptions {
  clock?: Clock;
}

type Body = (layout: BlockLayout, depotX: number, prep: PreparedStops, walk: Walk) => void;

function runPolicy(
  method: PolicyName,
  singleBlockOnly: boolean,
  body: Body,
  layout: BlockLayout,
  depotX: number,
  stops: readonly PolicyStop[],
  options: PolicyOptions,
): PolicyResult {
  const clock = options.clock ?? defaultClock;
  const t0 = clock();
  const bad = checkLayout(method, singleBlockOnly, layout, depotX);
  if (bad) return bad;
  const prep = prepareStops(layout, stops);
  if (isNotApplicable(prep)) return prep;
  const walk = new Walk(depotX, 0);
  if (stops.length > 0) {
    body(layout, depotX, prep, walk);
    walk.to(depotX, 0);
  }
  return { method, order: walk.order, length: walk.length, path: walk.path(layout), ms: clock() - t0 };
}

/** Picks the stops of one cell walking up (ascending depth) or down, along aisle x. */
function pickCell(walk: Walk, x: number, prep: PreparedStops, cell: readonly number[], up: boolean): void {
  if (up) for (let k = 0; k < cell.length; k++) walk.visit(cell[k]!, x, prep.depth[cell[k]!]!);
  else for (let k = cell.length - 1; k >= 0; k--) walk.visit(cell[k]!, x, prep.depth[cell[k]!]!);
}

/**
 * S-shape (traversal), any number of blocks, following the steps of Roodbergen & de Koster (2001):
 * 1. the left pick aisle (leftmost aisle with a stop) and the farthest block with a stop are found;
 * 2. from the depot to the front of the left pick aisle;
 * 3. up the left pick aisle to the front cross aisle of the farthest block, picking on the way;
 * 4. along that cross aisle to the leftmost subaisle of the farthest block with stops: if it is the only
 *    one in the block, enter it, pick and return to the front of the block; otherwise traverse it;
 * 5. in the current block (the picker is on its back cross aisle), go to whichever of the leftmost and
 *    rightmost subaisles with stops left is nearer in x (a tie goes left), traverse it; then
 * 6. traverse the next subaisles with stops in the same sweep direction, one after the other; the last
 *    one is traversed if the picker is at the back, or entered and left from the front if the picker is
 *    already at the front (an odd number of traversals so far: "last aisle entered and returned");
 *    a block with no stops left is crossed by continuing down the current aisle;
 * 7. block by block towards the depot, then along the front cross aisle back to the depot.
 * In a single block this is Hall's traversal policy: every pick aisle traversed, the rightmost one
 * entered and left from the front when the number of pick aisles is odd.
 */
export function sShape(layout: BlockLayout, depotX: number, stops: readonly PolicyStop[], options: PolicyOptions = {}): PolicyResult {
  return runPolicy('s-shape', false, sShapeBody, layout, depotX, stops, options);
}

const sShapeBody: Body = (layout, _depotX, prep, walk) => {
  const X = layout.aisleX;
  const c = layout.crossDepth;
  const B = layout.blocks;
  const n = X.length;
  const cells = prep.cells;
  const done = new Uint8Array(n * B);
  const has = (a: number, b: number): boolean => done[a * B + b] === 0 && cells[a * B + b]!.length > 0;

  let left = -1;
  let far = -1;
  for (let a = 0; a < n; a++)
    for (let b = 0; b < B; b++)
      if (has(a, b)) {
        if (left < 0) left = a;
        if (b > far) far = b;
      }

  walk.to(X[left]!, 0);
  for (let b = 0; b < far; b++) {
    pickCell(walk, X[left]!, prep, cells[left * B + b]!, true);
    done[left * B + b] = 1;
  }
  walk.to(X[left]!, c[far]!);

  const remaining = (b: number): number[] => {
    const r: number[] = [];
    for (let a = 0; a < n; a++) if (has(a, b)) r.push(a);
    return r;
  };

  let cur = remaining(far)[0]!;
  walk.to(X[cur]!, c[far]!);
  let b = far;
  if (remaining(far).length === 1) {
    pickCell(walk, X[cur]!, prep, cells[cur * B + far]!, true);
    walk.to(X[cur]!, c[far]!);
    b = far - 1;
  } else {
    pickCell(walk, X[cur]!, prep, cells[cur * B + far]!, true);
    walk.to(X[cur]!, c[far + 1]!);
  }
  done[cur * B + far] = 1;

  // From here on the picker stands on the back cross aisle of block b.
  for (; b >= 0; b--) {
    const rem = remaining(b);
    if (rem.length === 0) {
      walk.to(X[cur]!, c[b]!);
      continue;
    }
    const lo = rem[0]!;
    const hi = rem[rem.length - 1]!;
    const goLeft = Math.abs(X[lo]! - X[cur]!) <= Math.abs(X[hi]! - X[cur]!);
    const seq = goLeft ? rem : rem.slice().reverse();
    let atBack = true;
    for (let k = 0; k < seq.length; k++) {
      const a = seq[k]!;
      const cell = cells[a * B + b]!;
      walk.to(X[a]!, atBack ? c[b + 1]! : c[b]!);
      if (k === seq.length - 1 && !atBack) {
        pickCell(walk, X[a]!, prep, cell, true);
        walk.to(X[a]!, c[b]!);
      } else {
        pickCell(walk, X[a]!, prep, cell, !atBack);
        walk.to(X[a]!, atBack ? c[b]! : c[b + 1]!);
        atBack = !atBack;
      }
      done[a * B + b] = 1;
      cur = a;
    }
  }
};

/** Pick aisles (aisles with at least one stop) of a single-block layout, ascending. */
function pickAisles(prep: PreparedStops): number[] {
  const r: number[] = [];
  for (let a = 0; a < prep.cells.length; a++) if (prep.cells[a]!.length > 0) r.push(a);
  return r;
}

/** Enter aisle `a` from the front, pick every stop in it, come back to the front. */
function returnVisit(walk: Walk, layout: BlockLayout, prep: PreparedStops, a: number): void {
  const x = layout.aisleX[a]!;
  walk.to(x, 0);
  pickCell(walk, x, prep, prep.cells[a]!, true);
  walk.to(x, 0);
}

/**
 * Return policy (Hall 1993), single block: every pick aisle is entered from the front cross aisle up to
 * its deepest stop and left the same way, aisles from left to right.
 */
export function returnPolicy(layout: BlockLayout, depotX: number, stops: readonly PolicyStop[], options: PolicyOptions = {}): PolicyResult {
  return runPolicy('return', true, returnBody, layout, depotX, stops, options);
}

const returnBody: Body = (layout, _depotX, prep, walk) => {
  for (const a of pickAisles(prep)) returnVisit(walk, layout, prep, a);
};

/**
 * The common skeleton of midpoint and largest gap (Hall 1993), single block: the leftmost pick aisle is
 * traversed front to back, the inner pick aisles are entered from the back for their back part (left to
 * right), the rightmost pick aisle is traversed back to front, then the inner aisles are entered from the
 * front for their front part (right to left). `split(cell)` says how many of an inner aisle's stops
 * (ascending depth) are taken from the front; the rest are taken from the back. With a single pick aisle
 * both policies are the return route.
 */
function twoSidedBody(split: (prep: PreparedStops, cell: readonly number[], L: number) => number): Body {
  return (layout, _depotX, prep, walk) => {
    const X = layout.aisleX;
    const L = aisleLength(layout);
    const P = pickAisles(prep);
    if (P.length === 1) {
      returnVisit(walk, layout, prep, P[0]!);
      return;
    }
    const l = P[0]!;
    const r = P[P.length - 1]!;
    const inner = P.slice(1, -1);
    const cut = inner.map((a) => split(prep, prep.cells[a]!, L));
    walk.to(X[l]!, 0);
    pickCell(walk, X[l]!, prep, prep.cells[l]!, true);
    walk.to(X[l]!, L);
    for (let k = 0; k < inner.length; k++) {
      const cell = prep.cells[inner[k]!]!;
      const x = X[inner[k]!]!;
      if (cut[k]! === cell.length) continue;
      walk.to(x, L);
      for (let j = cell.length - 1; j >= cut[k]!; j--) walk.visit(cell[j]!, x, prep.depth[cell[j]!]!);
      walk.to(x, L);
    }
    walk.to(X[r]!, L);
    pickCell(walk, X[r]!, prep, prep.cells[r]!, false);
    walk.to(X[r]!, 0);
    for (let k = inner.length - 1; k >= 0; k--) {
      const cell = prep.cells[inner[k]!]!;
      const x = X[inner[k]!]!;
      if (cut[k]! === 0) continue;
      walk.to(x, 0);
      for (let j = 0; j < cut[k]!; j++) walk.visit(cell[j]!, x, prep.depth[cell[j]!]!);
      walk.to(x, 0);
    }
  };
}

/**
 * Midpoint (Hall 1993), single block: in the inner pick aisles, stops in the front half (depth ≤ L/2,
 * a stop exactly at the middle counts as front) are taken from the front, the others from the back; the
 * leftmost and rightmost pick aisles are traversed (see `twoSidedBody`).
 */
export function midpoint(layout: BlockLayout, depotX: number, stops: readonly PolicyStop[], options: PolicyOptions = {}): PolicyResult {
  return runPolicy('midpoint', true, midpointBody, layout, depotX, stops, options);
}

const midpointBody = twoSidedBody((prep, cell, L) => {
  let k = 0;
  while (k < cell.length && prep.depth[cell[k]!]! <= L / 2) k++;
  return k;
});

/**
 * Largest gap (Hall 1993), single block: in each inner pick aisle the largest of the gaps front→first
 * stop, between neighbouring stops, last stop→back is left unwalked; stops before it are taken from the
 * front, stops after it from the back. Ties go to the gap nearest the front (so more is taken from the
 * back). Leftmost and rightmost pick aisles are traversed (see `twoSidedBody`).
 */
export function largestGap(layout: BlockLayout, depotX: number, stops: readonly PolicyStop[], options: PolicyOptions = {}): PolicyResult {
  return runPolicy('largest-gap', true, largestGapBody, layout, depotX, stops, options);
}

const largestGapBody = twoSidedBody((prep, cell, L) => {
  // Gap k lies just before stop k (k = cell.length: after the last stop, up to the back).
  let best = 0;
  let bestGap = -1;
  for (let k = 0; k <= cell.length; k++) {
    const lo = k === 0 ? 0 : prep.depth[cell[k - 1]!]!;
    const hi = k === cell.length ? L : prep.depth[cell[k]!]!;
    if (hi - lo > bestGap) {
      bestGap = hi - lo;
      best = k;
    }
  }
  return best;
});

/**
 * Combined (Roodbergen & de Koster 2001), single block: pick aisles are visited from left to right, each
 * either traversed or entered and left from the side the picker is on; the choice is made by dynamic
 * programming over "picker at front / at back after aisle k", the picker starting at the front and
 * ending there after the rightmost pick aisle. Both S-shape and return are among its choices, so it is
 * never longer than either. Ties keep the first option found (return before traverse).
 */
export function combined(layout: BlockLayout, depotX: number, stops: readonly PolicyStop[], options: PolicyOptions = {}): PolicyResult {
  return runPolicy('combined', true, combinedBody, layout, depotX, stops, options);
}

const combinedBody: Body = (layout, _depotX, prep, walk) => {
  const X = layout.aisleX;
  const L = aisleLength(layout);
  const P = pickAisles(prep);
  const p = P.length;
  // cost[k*2+s]: aisle work (vertical metres) of aisles 0..k−1 ending on side s (0 front, 1 back).
  const cost = new Float64Array((p + 1) * 2).fill(Infinity);
  const traversed = new Uint8Array((p + 1) * 2);
  cost[0] = 0;
  for (let k = 0; k < p; k++) {
    const cell = prep.cells[P[k]!]!;
    const deepest = prep.depth[cell[cell.length - 1]!]!;
    const shallowest = prep.depth[cell[0]!]!;
    for (let s = 0; s < 2; s++) {
      const here = cost[k * 2 + s]!;
      if (here === Infinity) continue;
      const ret = here + 2 * (s === 0 ? deepest : L - shallowest);
      if (ret < cost[(k + 1) * 2 + s]!) {
        cost[(k + 1) * 2 + s] = ret;
        traversed[(k + 1) * 2 + s] = 0;
      }
      const trav = here + L;
      if (trav < cost[(k + 1) * 2 + (1 - s)]!) {
        cost[(k + 1) * 2 + (1 - s)] = trav;
        traversed[(k + 1) * 2 + (1 - s)] = 1;
      }
    }
  }
  const plan = new Uint8Array(p);
  for (let k = p, s = 0; k > 0; k--) {
    plan[k - 1] = traversed[k * 2 + s]!;
    if (plan[k - 1] === 1) s = 1 - s;
  }
  let back = false;
  for (let k = 0; k < p; k++) {
    const a = P[k]!;
    const x = X[a]!;
    const cell = prep.cells[a]!;
    walk.to(x, back ? L : 0);
    if (plan[k] === 1) {
      pickCell(walk, x, prep, cell, !back);
      back = !back;
      walk.to(x, back ? L : 0);
    } else {
      pickCell(walk, x, prep, cell, !back);
      walk.to(x, back ? L : 0);
    }
  }
};

export const POLICIES = {
  's-shape': sShape,
  return: returnPolicy,
  midpoint,
  'largest-gap': largestGap,
  combined,
} as const;
