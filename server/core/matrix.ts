/**
 * A symmetric, non-negative distance matrix over `n` points, stored row-major: `d[i * n + j]` is the
 * walking distance in metres from point i to point j. Index 0 is the depot wherever a trip is meant.
 */
export interface DistanceMatrix {
  readonly n: number;
  readonly d: Float64Array;
}

/** Wraps a row-major array; throws if its length is not n². */
export function matrixOf(n: number, d: Float64Array): DistanceMatrix {
  if (d.length !== n * n) throw new RangeError(`matrix needs ${n * n} entries, got ${d.length}`);
  return { n, d };
}

/** Builds a matrix from nested arrays (no validation; see `validateMatrix`). */
export function matrixFromRows(rows: readonly (readonly number[])[]): DistanceMatrix {
  const n = rows.length;
  const d = new Float64Array(n * n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) d[i * n + j] = rows[i]![j]!;
  return { n, d };
}

/** Builds a matrix by calling `f(i, j)` for i < j and mirroring; the diagonal is 0. O(n²) calls. */
export function matrixFromFunction(n: number, f: (i: number, j: number) => number): DistanceMatrix {
  const d = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let j = i + 1; j < n; j++) {
      const v = f(i, j);
      d[i * n + j] = v;
      d[j * n + i] = v;
    }
  }
  return { n, d };
}

/** Length in metres of the closed circuit visiting `order` and returning to its first entry. */
export function circuitLength(m: DistanceMatrix, order: ArrayLike<number>): number {
  const k = order.length;
  if (k < 2) return 0;
  let sum = 0;
  for (let i = 0; i < k; i++) sum += m.d[order[i]! * m.n + order[(i + 1) % k]!]!;
  return sum;
}

/**
 * Checks a nested-array matrix: square, symmetric (to 1e-9 relative), finite, non-negative, zero
 * diagonal. Returns a one-line problem description, or null when the matrix is valid.
 */
export function validateMatrix(rows: unknown): string | null {
  if (!Array.isArray(rows) || rows.length === 0) return 'distances must be a non-empty array of rows';
  const n = rows.length;
  for (let i = 0; i < n; i++) {
    const row: unknown = rows[i];
    if (!Array.isArray(row)) return `row ${i} is not an array`;
    if (row.length !== n) return `row ${i} has ${row.length} entries; a ${n}×${n} matrix needs ${n}`;
    for (let j = 0; j < n; j++) {
      const v: unknown = row[j];
      if (typeof v !== 'number' || !Number.isFinite(v)) return `distance [${i}][${j}] is not a finite number`;
      if (v < 0) return `distance [${i}][${j}] is negative (${v})`;
    }
  }
  for (let i = 0; i < n; i++) {
    if ((rows[i] as number[])[i] !== 0) return `distance [${i}][${i}] must be 0`;
    for (let j = i + 1; j < n; j++) {
      const a = (rows[i] as number[])[j]!;
      const b = (rows[j] as number[])[i]!;
      if (Math.abs(a - b) > 1e-9 * Math.max(1, Math.abs(a), Math.abs(b))) {
        return `matrix is not symmetric: [${i}][${j}] = ${a} but [${j}][${i}] = ${b}`;
      }
    }
  }
  return null;
}
