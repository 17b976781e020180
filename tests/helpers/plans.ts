/** Generated plans shaped like a typical site, for tests that need one of a given size. */
import { generateRectangularPlan, type RectangularPlanParams } from '../../server/core/plan/generate';
import type { PlanGeometry } from '../../server/core/plan/types';

/**
 * Aisles 3.2 m apart with bins on both sides, front and back cross aisles plus `middle` more, the depot at
 * the front centre; `size` gives the aisles, their length, bays and levels.
 */
export function sitePlan(size: Pick<RectangularPlanParams, 'aisles' | 'aisleLengthM' | 'baysPerAisle' | 'levels'>, middle: number): PlanGeometry {
  return generateRectangularPlan({ ...size, aisleSpacingM: 3.2, crossAisles: { front: true, back: true, middle }, depot: { at: 'front_centre' } });
}
