/** Worker entry for `checkFloorPlanFile`: reading and every check run here, off the server's event loop. */
import type { FloorPlanCheck, FloorPlanCheckProgress } from '../../../shared/floor-plans';
import type { ImportLimits } from '../../imports/limits';
import { readSpreadsheet } from '../../imports/spreadsheet';
import { serveJob } from '../../workers/worker-protocol';
import type { PlanLayout } from './check';
import { checkFloorPlanRead } from './check';
import { FLOOR_PLAN_SPEC } from './spec';

export interface FloorPlanJob {
  bytes: Uint8Array;
  filename: string;
  limits: ImportLimits;
  layout: PlanLayout | null;
}

serveJob<FloorPlanJob, FloorPlanCheckProgress, FloorPlanCheck>((job, progress) => {
  const read = readSpreadsheet(job.bytes, job.filename, FLOOR_PLAN_SPEC, job.limits, (fraction) => progress({ phase: 'parsing', fraction }));
  return checkFloorPlanRead(read, {
    layout: job.layout ?? undefined,
    maxIssues: job.limits.maxIssues,
    onProgress: (fraction) => progress({ phase: 'checking', fraction }),
  });
});
