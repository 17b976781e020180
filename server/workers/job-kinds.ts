/** Every kind of heavy job the app runs, registered on its job runner by createApp. */
import type { Deps } from '../deps';
import { floorPlanBuildJob } from '../floor-plans/floor-plans.service';
import { slottingJob } from '../slotting/slotting.service';
import { studyJob } from '../studies/studies.service';
import { wavePreviewJob } from '../waves/waves.service';

export function registerJobKinds(deps: Deps): void {
  deps.jobs.define(wavePreviewJob(deps));
  deps.jobs.define(studyJob(deps));
  deps.jobs.define(slottingJob(deps));
  deps.jobs.define(floorPlanBuildJob(deps));
}
