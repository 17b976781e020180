/**
 * The server side of an import: cheap refusals on the event loop (size, file type, ZIP directory),
 * then the real work in its own process with a time limit and a heap cap. A hostile file can at worst
 * cost that process its life; the server process keeps answering.
 */
import type { RowIssue } from '../../shared/imports';
import { runInWorker, WorkerCrashError, WorkerOutOfMemoryError, WorkerTimeoutError } from '../workers/spawn';
import type { ImportLimits } from './limits';
import type { SpreadsheetRead, WorkbookSpec } from './spreadsheet';
import { detectKind, emptySheet, FILE_SHEET } from './spreadsheet';
import { inspectZip } from './zip-guard';

export function fileIssue(message: string): RowIssue {
  return { sheet: FILE_SHEET, row: null, column: null, value: null, message };
}

/**
 * Refuses what can be refused without parsing: too big, not a spreadsheet, a ZIP directory over the
 * limits. O(ZIP entries). Returns null when the file may go on to the worker.
 */
export function preflight(bytes: Uint8Array, filename: string, limits: ImportLimits): RowIssue | null {
  if (bytes.length === 0) return fileIssue('the file is empty');
  if (bytes.length > limits.maxFileBytes) {
    return fileIssue(`the file is ${formatBytes(bytes.length)}; at most ${formatBytes(limits.maxFileBytes)} are accepted`);
  }
  const kind = detectKind(bytes, filename);
  if (typeof kind === 'object') return fileIssue(kind.refused);
  if (kind === 'xlsx') {
    const zip = inspectZip(bytes, limits);
    if (!zip.ok) return fileIssue(zip.message);
  }
  return null;
}

function formatBytes(n: number): string {
  if (n < 1024 * 1024) return `${Math.ceil(n / 1024)} KiB`;
  return `${(n / 1024 / 1024).toFixed(1).replace(/\.0$/, '')} MiB`;
}

export type JobOutcome<R> = { ok: true; result: R } | { ok: false; issue: RowIssue };

/**
 * Runs an import job module (one that calls `serveJob`) in its own process capped at
 * `limits.workerHeapMb` and `limits.timeoutMs`. A timeout, an out-of-memory stop or a fatal error in
 * that process becomes a file issue (nothing is saved); an error the job itself throws is a bug and rejects.
 */
export async function runImportJob<R, P>(
  moduleUrl: URL,
  data: unknown,
  limits: ImportLimits,
  onProgress?: (p: P) => void,
  signal?: AbortSignal,
): Promise<JobOutcome<R>> {
  try {
    const result = await runInWorker<R, P>(moduleUrl, data, {
      timeoutMs: limits.timeoutMs,
      heapMb: limits.workerHeapMb,
      ...(onProgress ? { onProgress } : {}),
      ...(signal ? { signal } : {}),
    });
    return { ok: true, result };
  } catch (e) {
    if (e instanceof WorkerTimeoutError) {
      return {
        ok: false,
        issue: fileIssue(`reading the file took longer than ${Math.round(limits.timeoutMs / 1000)} s and was stopped; split it into smaller files`),
      };
    }
    if (e instanceof WorkerOutOfMemoryError) {
      return {
        ok: false,
        issue: fileIssue(`reading the file needed more than ${limits.workerHeapMb} MiB of memory and was stopped; split it into smaller files`),
      };
    }
    if (e instanceof WorkerCrashError) {
      return { ok: false, issue: fileIssue(`reading the file ${e.message}; nothing was saved — check the file, or split it into smaller files`) };
    }
    throw e;
  }
}

/** What the generic read worker is given. */
export interface ReadJob {
  bytes: Uint8Array;
  filename: string;
  spec: WorkbookSpec;
  limits: ImportLimits;
}

/**
 * Reads a spreadsheet against `spec` in a fresh worker and returns its rows, or the file issue that
 * stopped it. For imports whose checks are light; heavy checks belong inside their own worker job.
 */
export async function readSpreadsheetFile(
  bytes: Uint8Array,
  filename: string,
  spec: WorkbookSpec,
  limits: ImportLimits,
  onProgress?: (fraction: number) => void,
): Promise<SpreadsheetRead> {
  const refused = preflight(bytes, filename, limits);
  if (refused) return { ok: false, kind: null, sheets: spec.sheets.map((s) => emptySheet(s.name)), issues: [refused] };
  const out = await runImportJob<SpreadsheetRead, number>(
    new URL('./read-worker.ts', import.meta.url),
    { bytes, filename, spec, limits } satisfies ReadJob,
    limits,
    onProgress,
  );
  return out.ok ? out.result : { ok: false, kind: null, sheets: spec.sheets.map((s) => emptySheet(s.name)), issues: [out.issue] };
}
