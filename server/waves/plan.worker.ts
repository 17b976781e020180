/** Worker: plans one wave on a plan's stored arrays, off the server's event loop. */
import { deserializeDistanceIndex, deserializeWalkGraph } from '../core/plan/serialize';
import type { PlanGeometry } from '../core/plan/types';
import { serveJob } from '../workers/worker-protocol';
import { planWaveOnPlan, type PlannerInput, type PlannerOutput } from './wave-planner';

export interface PlanJobData {
  geometry: PlanGeometry;
  graph: { json: string; blobs: Record<string, Uint8Array> };
  index: { json: string; blobs: Record<string, Uint8Array> };
  input: Omit<PlannerInput, 'geometry' | 'graph' | 'index' | 'progress'>;
}

serveJob<PlanJobData, number, PlannerOutput>((data, progress) => {
  let last = -1;
  return planWaveOnPlan({
    ...data.input,
    geometry: data.geometry,
    graph: deserializeWalkGraph(data.graph),
    index: deserializeDistanceIndex(data.index),
    progress: (f) => {
      // A message per percent is plenty for a progress bar.
      const pct = Math.floor(f * 100);
      if (pct !== last) {
        last = pct;
        progress(f);
      }
    },
  });
});
