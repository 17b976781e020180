import type { PlanIndex } from './plan-index';
import { binCentre } from './plan-index';
import type { PlanBin } from './types';
import { worldToScreen, type Viewport } from './viewport';

export interface BinTooltip {
  bin: PlanBin;
  /** How many levels stand at this bin's place. */
  levels: number;
  /** Where the box goes, in px from the map's top left. */
  left: number;
  top: number;
}

/**
 * The tooltip of bin `b` on a map of `width` × `height` px: beside the bin, flipped to its other side
 * near the right or bottom edge so the box stays inside the map; null when the bin is off screen.
 */
export function placeTooltip(index: PlanIndex, b: number, vp: Viewport, width: number, height: number): BinTooltip | null {
  const bin = index.bins[b];
  if (b < 0 || !bin) return null;
  const c = binCentre(index, b);
  const s = worldToScreen(vp, c.x, c.y);
  if (s.x < 0 || s.y < 0 || s.x > width || s.y > height) return null;
  const slot = index.binSlot[b] as number;
  const left = s.x > width - 220 ? Math.max(4, s.x - 214) : s.x + 14;
  const top = s.y > height - 110 ? Math.max(4, s.y - 104) : s.y + 14;
  return { bin, levels: index.slotBinCount[slot] as number, left, top };
}
