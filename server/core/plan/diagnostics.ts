/**
 * Structural problems of a plan, as indices into the plan's arrays so the importer can map each one
 * back to its spreadsheet row (core knows nothing about sheets).
 */
import type { PlanClosure, PlanGeometry } from './types';
import { crowdedAislePairs, MIN_WALKING_WIDTH_M, NOMINAL_RACK_DEPTH_M } from './types';
import type { WalkGraph } from './walk-graph';
import { NODE_JUNCTION, reachableFrom } from './walk-graph';

export type PlanProblemCode =
  | 'no_depot'
  | 'aisle_no_cross_aisle'
  | 'aisle_no_bins'
  | 'aisles_too_close'
  | 'bin_unknown_aisle'
  | 'bin_outside_aisle'
  | 'bin_unreachable'
  | 'depot_unlinked'
  | 'depot_unreachable'
  | 'closure_unknown';

export type PlanEntity = 'plan' | 'aisle' | 'bin' | 'depot' | 'closure';

export interface PlanProblem {
  severity: 'error' | 'warning';
  code: PlanProblemCode;
  entity: PlanEntity;
  /** Index into the plan array named by `entity` (`closures` for 'closure'); -1 for 'plan'. */
  index: number;
  /** A short English sentence; the importer may word its own from `code`. */
  message: string;
}

/**
 * Lists every structural problem of `plan` given its walk graph (built with the same closures).
 * Reachability is measured from the first depot that links to a centre line; when no depot links,
 * bins are not listed one by one (the depot errors name the cause). Errors first, in entity order,
 * then warnings ('aisle_no_bins', 'aisles_too_close'). Returns [] for a sound plan. O(V + E + B + A).
 */
export function diagnosePlan(plan: PlanGeometry, graph: WalkGraph, closures: readonly PlanClosure[] = []): PlanProblem[] {
  const errors: PlanProblem[] = [];
  const warnings: PlanProblem[] = [];
  const { aisles, crossAisles, bins, depots } = plan;

  if (depots.length === 0) {
    errors.push({ severity: 'error', code: 'no_depot', entity: 'plan', index: -1, message: 'the plan has no depot' });
  }

  const touches = new Uint8Array(aisles.length);
  const hasBins = new Uint8Array(aisles.length);
  for (let u = 0; u < graph.nodeCount; u++) {
    if (graph.kind[u]! & NODE_JUNCTION && graph.aisle[u]! >= 0) touches[graph.aisle[u]!] = 1;
  }
  const aisleByCode = new Map<string, number>();
  aisles.forEach((a, i) => aisleByCode.set(a.code, i));
  for (let b = 0; b < bins.length; b++) {
    const a = aisleByCode.get(bins[b]!.aisle);
    if (a !== undefined) hasBins[a] = 1;
  }
  for (let a = 0; a < aisles.length; a++) {
    if (!touches[a]) {
      errors.push({ severity: 'error', code: 'aisle_no_cross_aisle', entity: 'aisle', index: a, message: `aisle ${aisles[a]!.code} touches no cross aisle` });
    }
    if (!hasBins[a]) {
      warnings.push({ severity: 'warning', code: 'aisle_no_bins', entity: 'aisle', index: a, message: `aisle ${aisles[a]!.code} has no bins` });
    }
  }

  for (const p of crowdedAislePairs(plan)) {
    const [l, r] = [aisles[p.left]!, aisles[p.right]!];
    warnings.push({
      severity: 'warning',
      code: 'aisles_too_close',
      entity: 'aisle',
      index: p.right,
      message: `aisles ${l.code} and ${r.code} are ${fmt(p.pitchM)} m apart: with racks about ${fmt(NOMINAL_RACK_DEPTH_M)} m deep between them that leaves ${fmt(p.clearM)} m to walk, under ${fmt(MIN_WALKING_WIDTH_M)} m`,
    });
  }

  let reference = -1;
  for (let d = 0; d < depots.length; d++) {
    if (graph.depotLink[d]! < 0) {
      errors.push({
        severity: 'error',
        code: 'depot_unlinked',
        entity: 'depot',
        index: d,
        message: `depot ${depots[d]!.code} is farther than the link limit from every aisle and cross aisle`,
      });
    } else if (reference < 0) {
      reference = d;
    }
  }
  const seen = reference >= 0 ? reachableFrom(graph, graph.depotNode[reference]!) : null;
  if (seen) {
    for (let d = 0; d < depots.length; d++) {
      if (graph.depotLink[d]! >= 0 && !seen[graph.depotNode[d]!]) {
        errors.push({
          severity: 'error',
          code: 'depot_unreachable',
          entity: 'depot',
          index: d,
          message: `depot ${depots[d]!.code} cannot be reached from depot ${depots[reference]!.code}`,
        });
      }
    }
  }

  for (let b = 0; b < bins.length; b++) {
    const bin = bins[b]!;
    const node = graph.binNode[b]!;
    if (node < 0) {
      const unknown = !aisleByCode.has(bin.aisle);
      errors.push({
        severity: 'error',
        code: unknown ? 'bin_unknown_aisle' : 'bin_outside_aisle',
        entity: 'bin',
        index: b,
        message: unknown ? `bin ${bin.code}: aisle ${bin.aisle} does not exist` : `bin ${bin.code}: y ${bin.y} m lies outside aisle ${bin.aisle}`,
      });
    } else if (seen && !seen[node]) {
      errors.push({
        severity: 'error',
        code: 'bin_unreachable',
        entity: 'bin',
        index: b,
        message: `bin ${bin.code} cannot be reached from depot ${depots[reference]!.code}`,
      });
    }
  }

  const crossCodes = new Set(crossAisles.map((c) => c.code));
  closures.forEach((cl, i) => {
    const known = cl.kind === 'aisle' ? aisleByCode.has(cl.code) : crossCodes.has(cl.code);
    if (!known) {
      errors.push({
        severity: 'error',
        code: 'closure_unknown',
        entity: 'closure',
        index: i,
        message: `closure names unknown ${cl.kind === 'aisle' ? 'aisle' : 'cross aisle'} ${cl.code}`,
      });
    }
  });

  return errors.concat(warnings);
}

/** Metres with at most two decimals, for messages. */
function fmt(m: number): string {
  return String(Math.round(m * 100) / 100);
}
