/** The main-thread side of build.worker.ts: its input, output and progress, and how to run it. */
import type { FloorPlanStats } from '../../shared/floor-plans';
import type { PlanClosure } from '../core/plan/types';
import type { PackedPlan } from './packed-plan';
import type { RectangularPlanParams } from '../core/plan/generate';
import { AppError } from '../http/errors';
import { jobStopMessage, runInWorker } from '../workers/spawn';

export type BuildInput =
  | { kind: 'geometry'; plan: PackedPlan; closures: PlanClosure[]; budgetMs: number }
  | { kind: 'generate'; params: RectangularPlanParams; closures: PlanClosure[]; budgetMs: number };

export interface BuildProgress {
  phase: 'building_graph' | 'building_distances';
  fraction: number;
}

export interface SerializedSet {
  json: string;
  blobs: Record<string, Uint8Array>;
}

export interface BuildOutput {
  /** The generated geometry (generate jobs only; geometry jobs already have theirs). */
  plan: PackedPlan | null;
  graph: SerializedSet;
  index: SerializedSet;
  storedBytes: number;
  stats: FloorPlanStats;
  nodeCount: number;
  hubCount: number;
  unreachableBins: string[];
  buildMs: number;
}

/** The engine refused the plan; `refused` says why in words for the user. */
export interface BuildRefusal {
  refused: string;
}

/** Engine time budget inside the worker, and the worker's own hard limit around it. */
export const BUILD_BUDGET_MS = 60_000;
const WORKER_TIMEOUT_MS = 120_000;
/** Heap cap of a build's process (MiB): a 50,000-bin plan's graph and distance index fit well within it. */
const BUILD_HEAP_MB = 1024;

/**
 * Runs one build in its own process. Rejects with AppError `plan_refused` when the engine refuses
 * the plan, AppError `build_stopped` when its process was stopped (time, memory, fatal error), or Error
 * (WorkerCancelledError when `signal` aborted it).
 */
export async function runBuild(input: BuildInput, onProgress?: (p: BuildProgress) => void, signal?: AbortSignal): Promise<BuildOutput> {
  let out: BuildOutput | BuildRefusal;
  try {
    out = await runInWorker<BuildOutput | BuildRefusal, BuildProgress>(new URL('./build.worker.ts', import.meta.url), input, {
      timeoutMs: WORKER_TIMEOUT_MS,
      heapMb: BUILD_HEAP_MB,
      ...(onProgress ? { onProgress } : {}),
      ...(signal ? { signal } : {}),
    });
  } catch (err) {
    // Out of time or memory, or a fatal error: the plan (or its closures) is what this build was given.
    const stopped = jobStopMessage('Building the walk graph and distances', err);
    if (stopped) throw new AppError('unprocessable', 'build_stopped', stopped);
    throw err;
  }
  if ('refused' in out) throw new AppError('unprocessable', 'plan_refused', out.refused);
  return out;
}
