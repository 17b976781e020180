/**
 * The route table: every API route, with who may call it beside it. `createApp` mounts only these;
 * tests/server/access-table.test.ts fails if anything else is mounted or a route lacks a rule.
 * A domain adds its routes by exporting an array from <domain>/<domain>.routes.ts and listing it here.
 */
import { auditRoutes } from './audit/audit.routes';
import { authRoutes } from './auth/auth.routes';
import { backupRoutes } from './backups/backups.routes';
import { exportRoutes } from './exports/exports.routes';
import { floorPlanRoutes } from './floor-plans/floor-plans.routes';
import type { AnyRoute } from './http/route';
import { tokenRoutes } from './integrations/tokens.routes';
import { mailRoutes } from './mail/mail.routes';
import { orderRoutes } from './orders/orders.routes';
import { pickingRoutes } from './picking/picking.routes';
import { retentionRoutes } from './retention/retention.routes';
import { assignRoutes } from './picking/assign.routes';
import { siteRoutes } from './sites/sites.routes';
import { slottingRoutes } from './slotting/slotting.routes';
import { studyRoutes } from './studies/studies.routes';
import { systemRoutes } from './system/system.routes';
import { userRoutes } from './users/users.routes';
import { waveRoutes } from './waves/waves.routes';

export const routeTable: readonly AnyRoute[] = [
  ...systemRoutes,
  ...authRoutes,
  ...userRoutes,
  ...siteRoutes,
  ...tokenRoutes,
  ...mailRoutes,
  ...floorPlanRoutes,
  ...orderRoutes,
  ...waveRoutes,
  ...pickingRoutes,
  ...assignRoutes,
  ...studyRoutes,
  ...slottingRoutes,
  ...backupRoutes,
  ...retentionRoutes,
  ...auditRoutes,
  ...exportRoutes,
];
