/**
 * Limits applied to every uploaded spreadsheet before and while it is read. The ZIP figures follow
 * what was measured here: a 404 KiB workbook that unpacked to 400 MiB got past
 * a worker heap cap, so the archive directory is judged before any parser sees the bytes.
 */
export interface ImportLimits {
  /** Largest accepted upload, bytes. */
  maxFileBytes: number;
  /** Most files an .xlsx archive may hold. */
  maxZipEntries: number;
  /** Most bytes all archive entries may unpack to, together. */
  maxUncompressedBytes: number;
  /** Largest unpacked ÷ packed size, per entry and for the whole archive. */
  maxCompressionRatio: number;
  /** Entries smaller than this are not judged by their ratio alone (tiny XML parts compress oddly). */
  ratioFloorBytes: number;
  /** Most data rows a sheet may hold (the header row not counted). */
  maxRowsPerSheet: number;
  /** Columns past this one are not read; a value there is an error. */
  maxColumns: number;
  /** Longest text accepted in one cell, characters. */
  maxCellChars: number;
  /** Parsing and checking stop after this long, milliseconds. */
  timeoutMs: number;
  /** Heap cap of the parsing worker (V8 old generation), MiB. */
  workerHeapMb: number;
  /** Most issues listed; one more issue says how many were left out. */
  maxIssues: number;
}

export const DEFAULT_IMPORT_LIMITS: Readonly<ImportLimits> = Object.freeze({
  maxFileBytes: 20 * 1024 * 1024,
  maxZipEntries: 100,
  maxUncompressedBytes: 50 * 1024 * 1024,
  maxCompressionRatio: 100,
  ratioFloorBytes: 1024 * 1024,
  maxRowsPerSheet: 200_000,
  maxColumns: 64,
  maxCellChars: 1000,
  timeoutMs: 30_000,
  workerHeapMb: 512,
  maxIssues: 5000,
});

export function resolveLimits(over: Partial<ImportLimits> | undefined): ImportLimits {
  return { ...DEFAULT_IMPORT_LIMITS, ...over };
}
