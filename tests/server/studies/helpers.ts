/** A small single-block plan and generated waves on it, for engine-level study tests (no database). */
import { generateRectangularPlan } from '../../../server/core/plan/generate';
import type { PlanGeometry } from '../../../server/core/plan/types';
import { engineParams } from '../../../server/floor-plans/floor-plans.service';
import { generateStudyOrders } from '../../../server/studies/generate-orders';
import type { StudyEngineInput, StudyWave } from '../../../server/studies/study-engine';
import type { GeneratedOrders } from '../../../shared/studies';

/** 6 aisles of 20 m, 10 bays, 2 levels, front and back cross aisles only, depot front left. */
export const smallPlan = (): PlanGeometry =>
  generateRectangularPlan(
    engineParams({
      aisles: 6,
      aisleLengthM: 20,
      aisleSpacingM: 3.2,
      baysPerAisle: 10,
      levels: 2,
      bothSides: true,
      crossAisles: { front: true, back: true, middle: 0 },
      crossAisleWidthM: 3,
      depot: 'front_left',
    }),
  );

export const SMALL_CART = { totes: 6, maxKg: 100, maxLitres: 300 };

/** The generated waves of `spec` for `seed` on the plan, on the small cart. */
export const wavesOn = (geometry: PlanGeometry, spec: GeneratedOrders, seed: number): StudyWave[] =>
  generateStudyOrders(geometry.bins, spec, seed).map((orders, i) => ({ id: i + 1, name: `Wave ${i + 1}`, orders, cart: SMALL_CART }));

/** A study of `waves` on the plan: best + local and S-shape, single and savings batching, speeds 1 m/s, 10 s a line, 5 s a stop. */
export const smallStudy = (geometry: PlanGeometry, waves: StudyWave[], seed: number, extra: Partial<StudyEngineInput> = {}): StudyEngineInput => ({
  base: { geometry, closures: [], depotIdx: 0 },
  whatIfs: [],
  waves,
  tripsFrom: 'savings',
  routing: ['best+local', 's-shape'],
  batching: ['single', 'savings'],
  speeds: { walkingSpeedMps: 1, secondsPerLine: 10, secondsPerStop: 5 },
  dayScale: 1,
  seed,
  ...extra,
});
