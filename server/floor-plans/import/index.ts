/**
 * Floor-plan import: check an uploaded workbook (or a bins CSV against an existing layout) and get
 * the geometry or the table of problems; the downloadable template; the error table as a file.
 */
import type { FloorPlanCheck, FloorPlanCheckProgress } from '../../../shared/floor-plans';
import type { ImportLimits } from '../../imports/limits';
import { resolveLimits } from '../../imports/limits';
import { preflight, runImportJob } from '../../imports/run';
import type { PlanLayout } from './check';
import type { FloorPlanJob, PackedFloorPlanCheck } from './check-worker';
import { unpackBins } from './pack';

export type { PlanLayout } from './check';
export { buildFloorPlanTemplate, floorPlanToWorkbook } from './template';
export { rowIssuesToCsv, rowIssuesToXlsx } from '../../imports/issues-export';

export interface CheckFloorPlanOptions {
  onProgress?: (p: FloorPlanCheckProgress) => void;
  /** Stop reading and checking after this long; default 30 s. */
  timeoutMs?: number;
  /** For a bins CSV: the aisles, cross aisles and depots it is checked against. */
  layout?: PlanLayout;
  limits?: Partial<ImportLimits>;
  /** Aborting stops the reading process (the job was cancelled). */
  signal?: AbortSignal;
}

const NO_STATS = { aisles: 0, crossAisles: 0, bins: 0, accessPoints: 0, depots: 0, totalAisleLengthM: 0 };

/**
 * Checks a floor-plan file completely. Size and ZIP directory are judged here (O(entries)); reading
 * and every row and geometry check run in a fresh worker with a time limit and a heap cap, so a big
 * or hostile file never blocks the event loop. Resolves with `ok: false` and the issues for any bad
 * file (also a timeout or an out-of-memory stop); rejects only on a bug.
 */
export async function checkFloorPlanFile(bytes: Uint8Array, filename: string, options: CheckFloorPlanOptions = {}): Promise<FloorPlanCheck> {
  const limits = resolveLimits({ ...options.limits, ...(options.timeoutMs === undefined ? {} : { timeoutMs: options.timeoutMs }) });
  const refused = preflight(bytes, filename, limits);
  if (refused) return { ok: false, errors: [refused], warnings: [], stats: NO_STATS, plan: null };
  const job: FloorPlanJob = { bytes, filename, limits, layout: options.layout ?? null };
  const out = await runImportJob<PackedFloorPlanCheck, FloorPlanCheckProgress>(
    new URL('./check-worker.ts', import.meta.url),
    job,
    limits,
    options.onProgress,
    options.signal,
  );
  if (!out.ok) return { ok: false, errors: [out.issue], warnings: [], stats: NO_STATS, plan: null };
  const { plan } = out.result;
  return { ...out.result, plan: plan ? { ...plan, bins: unpackBins(plan.bins) } : null };
}
