/** Worker: runs one slotting job off the server's event loop; the server stops it to cancel. */
import { serveJob } from '../workers/worker-protocol';
import type { SlottingResults } from '../../shared/slotting';
import { runSlottingJob, type SlottingJobInput } from './slotting.job';

serveJob<SlottingJobInput, number, SlottingResults>((data, progress) => {
  let last = -1;
  return runSlottingJob(data, (f) => {
    const step = Math.floor(f * 100);
    if (step !== last) {
      last = step;
      progress(f);
    }
  });
});
