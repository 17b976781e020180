/** Worker entry for `checkFloorPlanFile`: reading and every check run here, off the server's event loop. */
import type { FloorPlanCheck, FloorPlanCheckProgress } from '../../../shared/floor-plans';
import type { PlanGeometry } from '../../core/plan/types';
import type { ImportLimits } from '../../imports/limits';
import { readSpreadsheet } from '../../imports/spreadsheet';
import { serveJob } from '../../workers/worker-protocol';
import type { PlanLayout } from './check';
import { checkFloorPlanRead } from './check';
import type { PackedBins } from './pack';
import { packBins } from './pack';
import { FLOOR_PLAN_SPEC } from './spec';

export interface FloorPlanJob {
  bytes: Uint8Array;
  filename: string;
  limits: ImportLimits;
  layout: PlanLayout | null;
}

/** The check as posted back: the plan's bins travel packed (see pack.ts). */
export type PackedFloorPlanCheck = Omit<FloorPlanCheck, 'plan'> & {
  plan: (Omit<PlanGeometry, 'bins'> & { bins: PackedBins }) | null;
};

serveJob<FloorPlanJob, FloorPlanCheckProgress, PackedFloorPlanCheck>((job, progress) => {
  const read = readSpreadsheet(job.bytes, job.filename, FLOOR_PLAN_SPEC, job.limits, (fraction) => progress({ phase: 'parsing', fraction }));
  const r = checkFloorPlanRead(read, {
    layout: job.layout ?? undefined,
    maxIssues: job.limits.maxIssues,
    onProgress: (fraction) => progress({ phase: 'checking', fraction }),
  });
  return { ...r, plan: r.plan ? { ...r.plan, bins: packBins(r.plan.bins) } : null };
});
