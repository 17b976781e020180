import type { DemoSeeder } from './demo';
import { seedDemoFloorPlan } from '../floor-plans/demo-seed';
import { seedDemoOrders } from '../orders/demo-seed';

/** Demo content beyond users and the site, in order; each domain appends its seeder here. */
export const demoSeeders: DemoSeeder[] = [seedDemoFloorPlan, seedDemoOrders];
