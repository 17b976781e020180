/**
 * Demo seeder: an invented layout for the demo site, generated and activated: 12 aisles of 30 bays on
 * both sides, 4 levels (2,880 bins), front, middle and back cross aisles, the depot at the front centre.
 */
import type { Knex } from 'knex';
import { DEFAULT_PLAN_PARAMS } from '../../shared/floor-plans';
import { BUILD_BUDGET_MS, runBuild } from './build';
import { activatePlan, engineParams, saveBuiltPlan } from './floor-plans.service';
import { unpackPlan } from './packed-plan';

/** The demo's layout: the plan generator's default (shared/floor-plans.ts). */
export const DEMO_PLAN_PARAMS = DEFAULT_PLAN_PARAMS;

export async function seedDemoFloorPlan(db: Knex, siteId: number, userIds: Record<string, number>): Promise<void> {
  const userId = userIds.supervisor ?? userIds.admin!;
  const built = await runBuild({ kind: 'generate', params: engineParams(DEMO_PLAN_PARAMS), closures: [], budgetMs: BUILD_BUDGET_MS });
  const planId = await saveBuiltPlan(
    db,
    { siteId, userId, name: 'East hall (demo layout)', source: 'generated', sourceFilename: null, generatorParams: DEMO_PLAN_PARAMS, warnings: [] },
    unpackPlan(built.plan!),
    built,
  );
  await activatePlan(db, siteId, planId, userId);
}
