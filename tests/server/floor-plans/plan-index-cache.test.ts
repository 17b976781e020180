import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { activePlanId, loadPlanIndex } from '../../../server/floor-plans/plan-index';
import { makeTestApp, type TestApp } from '../../helpers/app';
import { makeDemoApp } from '../../helpers/waves';

describe('the plan index cache', () => {
  let a: TestApp;
  let b: TestApp;
  beforeAll(async () => {
    a = await makeDemoApp();
    b = await makeTestApp();
  });
  afterAll(async () => {
    await a.close();
    await b.close();
  });

  it("never serves one database's plan for the same id in another (regression: a bench saw 0 trips)", async () => {
    const idA = (await activePlanId(a.deps.db, a.siteId))!;
    const planA = await loadPlanIndex(a.deps.db, idA);
    // Database B gets a different plan under the same id.
    const { generateRectangularPlan } = await import('../../../server/core/plan/generate');
    const { runBuild, BUILD_BUDGET_MS } = await import('../../../server/floor-plans/build');
    const { saveBuiltPlan } = await import('../../../server/floor-plans/floor-plans.service');
    const params = { aisles: 3, aisleLengthM: 10, aisleSpacingM: 3, baysPerAisle: 4, levels: 1 };
    const built = await runBuild({ kind: 'generate', params, closures: [], budgetMs: BUILD_BUDGET_MS });
    const idB = await saveBuiltPlan(
      b.deps.db,
      { siteId: b.siteId, userId: 1, name: 'small', source: 'generated', sourceFilename: null, generatorParams: null as never, warnings: [] },
      generateRectangularPlan(params),
      built,
    );
    expect(idB).toBe(idA);
    const planB = await loadPlanIndex(b.deps.db, idB);
    expect(planB.geometry.bins.length).toBe(generateRectangularPlan(params).bins.length);
    expect(planB.geometry.bins.length).not.toBe(planA.geometry.bins.length);
  });
});
