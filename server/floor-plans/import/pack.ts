/**
 * Bins as parallel arrays for the trip from the check worker to the server thread. Structured-cloning
 * 50,000 bin objects cost the receiving event loop 100–250 ms here; a few typed arrays and one string
 * clone in a few milliseconds, and rebuilding the objects is a tight loop.
 */
import type { PlanBin } from '../../core/plan/types';

export interface PackedBins {
  count: number;
  /** Bin codes joined by "\n" (codes never hold control characters; readCode refuses them). */
  codes: string;
  aisleCodes: string[];
  aisle: Int32Array;
  y: Float64Array;
  /** Bay number, or -1 for none. */
  bay: Int32Array;
  /** 0 = L, 1 = R. */
  side: Uint8Array;
  level: Int32Array;
  zoneNames: string[];
  /** Index into zoneNames, or -1 for none. */
  zone: Int32Array;
}

/** O(bins). */
export function packBins(bins: readonly PlanBin[]): PackedBins {
  const n = bins.length;
  const aisleIndex = new Map<string, number>();
  const zoneIndex = new Map<string, number>();
  const p: PackedBins = {
    count: n,
    codes: bins.map((b) => b.code).join('\n'),
    aisleCodes: [],
    aisle: new Int32Array(n),
    y: new Float64Array(n),
    bay: new Int32Array(n),
    side: new Uint8Array(n),
    level: new Int32Array(n),
    zoneNames: [],
    zone: new Int32Array(n),
  };
  const indexOf = (map: Map<string, number>, list: string[], key: string): number => {
    let i = map.get(key);
    if (i === undefined) {
      i = list.length;
      list.push(key);
      map.set(key, i);
    }
    return i;
  };
  for (let i = 0; i < n; i++) {
    const b = bins[i]!;
    p.aisle[i] = indexOf(aisleIndex, p.aisleCodes, b.aisle);
    p.y[i] = b.y;
    p.bay[i] = b.bay ?? -1;
    p.side[i] = b.side === 'L' ? 0 : 1;
    p.level[i] = b.level;
    p.zone[i] = b.zone === null ? -1 : indexOf(zoneIndex, p.zoneNames, b.zone);
  }
  return p;
}

/** O(bins). */
export function unpackBins(p: PackedBins): PlanBin[] {
  if (p.count === 0) return [];
  const codes = p.codes.split('\n');
  const out = new Array<PlanBin>(p.count);
  for (let i = 0; i < p.count; i++) {
    const bay = p.bay[i]!;
    const zone = p.zone[i]!;
    out[i] = {
      code: codes[i]!,
      aisle: p.aisleCodes[p.aisle[i]!]!,
      y: p.y[i]!,
      bay: bay < 0 ? null : bay,
      side: p.side[i] === 0 ? 'L' : 'R',
      level: p.level[i]!,
      zone: zone < 0 ? null : p.zoneNames[zone]!,
    };
  }
  return out;
}
