/** Random test instances, seeded through the engine's own generator so every run sees the same ones. */
import type { DistanceMatrix } from '../../server/core/matrix';
import { matrixFromFunction } from '../../server/core/matrix';
import { createRng } from '../../server/core/rng';

/** n points uniform in a side × side square, Euclidean distances (unrounded). */
export function randomPoints(n: number, seed: number, side = 1000): [number, number][] {
  const rng = createRng(seed);
  return Array.from({ length: n }, () => [rng.next() * side, rng.next() * side] as [number, number]);
}

export function euclidean(points: readonly (readonly [number, number])[]): DistanceMatrix {
  return matrixFromFunction(points.length, (i, j) => Math.hypot(points[i]![0] - points[j]![0], points[i]![1] - points[j]![1]));
}

export function randomEuclidean(n: number, seed: number, side = 1000): DistanceMatrix {
  return euclidean(randomPoints(n, seed, side));
}

/** Symmetric matrix with independent integer entries in [1, max]: no triangle inequality. */
export function randomIntegerMatrix(n: number, seed: number, max = 100): DistanceMatrix {
  const rng = createRng(seed);
  return matrixFromFunction(n, () => 1 + rng.int(max));
}

/** True when `order` starts at `depot` and lists each of 0..n-1 exactly once. */
export function isCircuit(order: readonly number[], n: number, depot = 0): boolean {
  if (order.length !== n || order[0] !== depot) return false;
  const seen = new Uint8Array(n);
  for (const v of order) {
    if (!Number.isInteger(v) || v < 0 || v >= n || seen[v]) return false;
    seen[v] = 1;
  }
  return true;
}

/** 0…n−1 in a seeded random order (Fisher–Yates), as a starting circuit to improve. */
export function shuffled(n: number, seed: number): number[] {
  const rng = createRng(seed);
  const a = Array.from({ length: n }, (_, i) => i);
  for (let i = n - 1; i > 0; i--) {
    const j = rng.int(i + 1);
    [a[i], a[j]] = [a[j]!, a[i]!];
  }
  return a;
}
