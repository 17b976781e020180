/** Set-up shared by the benches that run the real server on a database file of their own. */
import { createHasher } from '../../server/auth/hasher';
import { migrateLatest, openDb, type Db } from '../../server/db/knex';
import { seedDemoFloorPlan } from '../../server/floor-plans/demo-seed';
import { activePlanId } from '../../server/floor-plans/plan-index';
import { seedDemoOrders } from '../../server/orders/demo-seed';
import { seedDemoIfEmpty } from '../../server/seed/demo';

/**
 * Opens `file`, runs the migrations and seeds the demo site with its floor plan and orders. Hashes are
 * cheap (sign-ins are set-up here, not what is measured); `hasher` makes more of the same kind.
 */
export async function openDemoDb(file: string) {
  const db: Db = openDb(file);
  await migrateLatest(db);
  const hasher = createHasher({ memoryCost: 1024, timeCost: 1 });
  await seedDemoIfEmpty(db, hasher, [seedDemoFloorPlan, seedDemoOrders]);
  const siteId = (await db('sites').first<{ id: number }>('id'))!.id;
  const supervisorId = (await db('users').where({ role: 'supervisor' }).first<{ id: number }>('id'))!.id;
  const planId = (await activePlanId(db, siteId))!;
  return { db, hasher, siteId, supervisorId, planId, now: new Date().toISOString() };
}
