/**
 * Shared by `route` and `bound`: reads `{ distances, depot }` or `{ points, depot }` JSON and flags,
 * turning every problem into one line that names it (the command prints it and exits 2).
 */
import type { DistanceMatrix } from '../../core/matrix';
import { matrixFromFunction, matrixFromRows, validateMatrix } from '../../core/matrix';

export class InputError extends Error {}

export interface Trip {
  matrix: DistanceMatrix;
  depot: number;
}

/** Parses stdin text into a validated trip; throws InputError naming the first problem. */
export function parseTrip(text: string): Trip {
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch (e) {
    throw new InputError(`stdin is not valid JSON (${(e as Error).message})`);
  }
  if (typeof data !== 'object' || data === null || Array.isArray(data)) {
    throw new InputError('stdin must be a JSON object with "distances" or "points"');
  }
  const obj = data as Record<string, unknown>;
  const hasD = 'distances' in obj;
  const hasP = 'points' in obj;
  if (hasD === hasP) throw new InputError('give exactly one of "distances" (square matrix) or "points" ([x, y] pairs)');

  let matrix: DistanceMatrix;
  if (hasD) {
    const problem = validateMatrix(obj.distances);
    if (problem) throw new InputError(problem);
    matrix = matrixFromRows(obj.distances as number[][]);
  } else {
    const pts = obj.points;
    if (!Array.isArray(pts) || pts.length === 0) throw new InputError('points must be a non-empty array of [x, y] pairs');
    for (let i = 0; i < pts.length; i++) {
      const p: unknown = pts[i];
      if (!Array.isArray(p) || p.length !== 2 || !p.every((v) => typeof v === 'number' && Number.isFinite(v))) {
        throw new InputError(`point ${i} is not a pair of finite numbers [x, y]`);
      }
    }
    const xy = pts as [number, number][];
    matrix = matrixFromFunction(xy.length, (i, j) => Math.hypot(xy[i]![0] - xy[j]![0], xy[i]![1] - xy[j]![1]));
  }

  const depot = obj.depot ?? 0;
  if (typeof depot !== 'number' || !Number.isInteger(depot) || depot < 0 || depot >= matrix.n) {
    throw new InputError(`depot ${JSON.stringify(depot)} is out of range: it must be an integer from 0 to ${matrix.n - 1}`);
  }
  return { matrix, depot };
}

/**
 * Parses `--name value` / `--name=value` flags against an allowlist; every value stays a string.
 * Throws InputError for an unknown flag, a missing value or a stray argument.
 */
export function parseFlags(args: readonly string[], allowed: readonly string[]): Map<string, string> {
  const out = new Map<string, string>();
  for (let i = 0; i < args.length; i++) {
    const a = args[i]!;
    if (!a.startsWith('--')) throw new InputError(`unexpected argument '${a}'`);
    const eq = a.indexOf('=');
    const name = eq < 0 ? a.slice(2) : a.slice(2, eq);
    if (!allowed.includes(name)) throw new InputError(`unknown option --${name} (expected ${allowed.map((f) => `--${f}`).join(', ')})`);
    let value: string | undefined;
    if (eq >= 0) value = a.slice(eq + 1);
    else value = args[++i];
    if (value === undefined || value === '') throw new InputError(`--${name} needs a value`);
    out.set(name, value);
  }
  return out;
}

/** A non-negative number of milliseconds, or InputError. */
export function parseTimeLimit(v: string | undefined): number | undefined {
  if (v === undefined) return undefined;
  const n = Number(v);
  if (!Number.isFinite(n) || n < 0) throw new InputError(`--time-limit-ms must be a non-negative number, got '${v}'`);
  return n;
}
