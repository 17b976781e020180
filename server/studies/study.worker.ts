/** Worker: runs one study off the server's event loop; the server terminates it to cancel. */
import { serveJob } from '../workers/worker-protocol';
import { runStudy, type StudyEngineInput } from './study-engine';
import type { StudyResults } from '../../shared/studies';

export interface StudyProgress {
  fraction: number;
  phase: string;
}

serveJob<Omit<StudyEngineInput, 'progress'>, StudyProgress, StudyResults>((data, progress) => {
  let last = -1;
  return runStudy({
    ...data,
    progress: (fraction, phase) => {
      // A message per half percent is plenty for a progress bar.
      const step = Math.floor(fraction * 200);
      if (step !== last) {
        last = step;
        progress({ fraction, phase });
      }
    },
  });
});
