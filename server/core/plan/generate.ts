/**
 * Rectangular floor plans from a few parameters, for what-if studies, the demo and the tests.
 *
 * Layout: aisle i (0-based) has its centre line at x = i × spacing and runs from y = 0 (the front)
 * to y = aisleLength (the back). The front cross aisle lies at y = 0, the back one at y = aisleLength,
 * middle ones evenly between; every cross aisle spans the first to the last aisle centre line. Racks
 * stop half a cross-aisle width short of each cross-aisle centre line, and the bays of an aisle are
 * shared out evenly over the blocks between cross aisles (earlier blocks take the remainder).
 *
 * Bin codes: `<aisle>-<bay>-<level>-<side>`, e.g. `C-07-03-2`: aisle letters as spreadsheet columns
 * (A…Z, AA, AB…), bay numbered from the front from 1 (two digits, more when there are over 99),
 * level from the floor from 1 (two digits), side 1 = left, 2 = right, facing the back (left is −x).
 */
import type { PlanBin, PlanCrossAisle, PlanGeometry } from './types';

export type DepotPosition = { at: 'front_left' } | { at: 'front_centre' } | { at: 'custom'; x: number };

export interface RectangularPlanParams {
  /** Number of pick aisles, ≥ 1. */
  aisles: number;
  /** Metres from the front to the back end of each aisle centre line. */
  aisleLengthM: number;
  /** Metres between neighbouring aisle centre lines. */
  aisleSpacingM: number;
  baysPerAisle: number;
  levels: number;
  /** Bins on both sides of each aisle (default) or on the left side only. */
  bothSides?: boolean;
  /** Default: front and back, no middle cross aisle. */
  crossAisles?: { front?: boolean; back?: boolean; middle?: number };
  /** Metres; racks end half of this from a cross-aisle centre line. Default 3. */
  crossAisleWidthM?: number;
  /** Default front left. */
  depot?: DepotPosition;
  /** Metres in front of the aisles' front ends (y = −setback). Default 2, within the depot link limit. */
  depotSetbackM?: number;
}

/** Spreadsheet-column letters for a 0-based index: 0 → A, 25 → Z, 26 → AA. */
export function aisleLetters(i: number): string {
  let s = '';
  for (let k = i + 1; k > 0; k = Math.floor((k - 1) / 26)) s = String.fromCharCode(65 + ((k - 1) % 26)) + s;
  return s;
}

/**
 * Builds the plan; throws RangeError on counts that are not positive integers, non-positive lengths,
 * no cross aisle at all, or blocks too short to hold racks. Deterministic; O(bins).
 */
export function generateRectangularPlan(params: RectangularPlanParams): PlanGeometry {
  const { aisles: nA, aisleLengthM: L, aisleSpacingM: s, baysPerAisle: nB, levels: nL } = params;
  const bothSides = params.bothSides ?? true;
  const front = params.crossAisles?.front ?? true;
  const back = params.crossAisles?.back ?? true;
  const middle = params.crossAisles?.middle ?? 0;
  const width = params.crossAisleWidthM ?? 3;
  const setback = params.depotSetbackM ?? 2;
  for (const [name, v] of [
    ['aisles', nA],
    ['baysPerAisle', nB],
    ['levels', nL],
  ] as const) {
    if (!Number.isInteger(v) || v < 1) throw new RangeError(`${name} must be a positive integer, got ${v}`);
  }
  if (!Number.isInteger(middle) || middle < 0) throw new RangeError(`middle cross aisles must be a non-negative integer, got ${middle}`);
  for (const [name, v] of [
    ['aisleLengthM', L],
    ['aisleSpacingM', s],
  ] as const) {
    if (!(v > 0) || !Number.isFinite(v)) throw new RangeError(`${name} must be a positive number of metres, got ${v}`);
  }
  if (!(width >= 0) || !(setback >= 0)) throw new RangeError('cross-aisle width and depot setback must be ≥ 0 m');
  if (!front && !back && middle === 0) throw new RangeError('a plan needs at least one cross aisle');

  const xLast = (nA - 1) * s;
  const aisles = Array.from({ length: nA }, (_, i) => ({ code: aisleLetters(i), x: i * s, yStart: 0, yEnd: L }));

  const crossAisles: PlanCrossAisle[] = [];
  const cuts: { y: number; present: boolean }[] = [{ y: 0, present: front }];
  if (front) crossAisles.push({ code: 'front', y: 0, xStart: 0, xEnd: xLast });
  for (let k = 1; k <= middle; k++) {
    const y = (L * k) / (middle + 1);
    crossAisles.push({ code: `middle-${k}`, y, xStart: 0, xEnd: xLast });
    cuts.push({ y, present: true });
  }
  if (back) crossAisles.push({ code: 'back', y: L, xStart: 0, xEnd: xLast });
  cuts.push({ y: L, present: back });

  // Bay centres, shared by every aisle.
  const blocks = cuts.length - 1;
  const bayY: number[] = [];
  for (let k = 0; k < blocks; k++) {
    const lo = cuts[k]!.y + (cuts[k]!.present ? width / 2 : 0);
    const hi = cuts[k + 1]!.y - (cuts[k + 1]!.present ? width / 2 : 0);
    const bays = Math.floor(nB / blocks) + (k < nB % blocks ? 1 : 0);
    if (bays === 0) continue;
    if (!(hi > lo)) throw new RangeError(`block ${k + 1} has no room for racks: aisles too short for ${crossAisles.length} cross aisles ${width} m wide`);
    const bay = (hi - lo) / bays;
    for (let b = 0; b < bays; b++) bayY.push(lo + (b + 0.5) * bay);
  }

  const bayDigits = Math.max(2, String(nB).length);
  const levelDigits = Math.max(2, String(nL).length);
  const sides: PlanBin['side'][] = bothSides ? ['L', 'R'] : ['L'];
  const bins: PlanBin[] = [];
  for (const aisle of aisles) {
    for (let b = 0; b < nB; b++) {
      const bayCode = String(b + 1).padStart(bayDigits, '0');
      for (const side of sides) {
        for (let l = 1; l <= nL; l++) {
          bins.push({
            code: `${aisle.code}-${bayCode}-${String(l).padStart(levelDigits, '0')}-${side === 'L' ? 1 : 2}`,
            aisle: aisle.code,
            y: bayY[b]!,
            bay: b + 1,
            side,
            level: l,
            zone: null,
          });
        }
      }
    }
  }

  const depot = params.depot ?? { at: 'front_left' };
  if (depot.at === 'custom' && !Number.isFinite(depot.x)) throw new RangeError(`custom depot x must be a finite number of metres, got ${depot.x}`);
  const depotX = depot.at === 'front_left' ? 0 : depot.at === 'front_centre' ? xLast / 2 : depot.x;
  return { aisles, crossAisles, bins, depots: [{ code: 'D1', x: depotX, y: -setback }] };
}
