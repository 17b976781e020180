/**
 * Reader for the TSPLIB 95 files in ../shared/reference/tsplib beside the checkout (Reinelt 1991; distance functions
 * from the TSPLIB 95 documentation, section 2, as restated in the README there). Test-only helper.
 */
import { existsSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { DistanceMatrix } from '../../server/core/matrix';
import { matrixFromFunction } from '../../server/core/matrix';

/** The shared reference folder lies beside the checkout (CI lays it the same way); TSPLIB_DIR overrides. */
function findTsplibDir(): string {
  const beside = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..', '..', 'shared', 'reference', 'tsplib');
  const candidates = [process.env.TSPLIB_DIR, beside, '/work/shared/reference/tsplib'].filter((d): d is string => !!d);
  return candidates.find((d) => existsSync(join(d, 'README.md'))) ?? beside;
}

export const TSPLIB_DIR = findTsplibDir();

export type EdgeWeightType = 'EUC_2D' | 'ATT' | 'GEO';

export interface TsplibInstance {
  name: string;
  type: EdgeWeightType;
  /** Coordinates as written in the file, x (or latitude) then y (or longitude). */
  coords: [number, number][];
  matrix: DistanceMatrix;
}

/** Published optimal tour lengths (TSPLIB README table; Reinelt 1991 / TSPLIB 95 optima list). */
export const TSPLIB_OPTIMA: Record<string, number> = {
  burma14: 3323,
  ulysses16: 6859,
  ulysses22: 7013,
  att48: 10628,
  eil51: 426,
  berlin52: 7542,
  st70: 675,
  kroA100: 21282,
};

/**
 * Proven optima of the larger instances, for benchmarks (TSPLIB README table in the reference folder;
 * TSPLIB 95 `bestSolutions`, Reinelt 1991). Kept apart from TSPLIB_OPTIMA so unit tests stay small.
 */
export const TSPLIB_LARGE_OPTIMA: Record<string, number> = {
  kroA200: 29368,
  lin318: 42029,
  pr439: 107217,
  rat575: 6773,
  u724: 41910,
  rat783: 8806,
  pr1002: 259045,
  d1291: 50801,
  pr2392: 378032,
};

/** Instances that ship an .opt.tour file (TSPLIB README table). */
export const TSPLIB_WITH_TOUR = ['ulysses16', 'ulysses22', 'att48', 'eil51', 'berlin52', 'st70', 'kroA100'];

const nint = (x: number): number => Math.floor(x + 0.5);

/** TSPLIB 95 documentation, section 2.1 (EUC_2D). */
export function euc2d(a: [number, number], b: [number, number]): number {
  const dx = a[0] - b[0];
  const dy = a[1] - b[1];
  return nint(Math.sqrt(dx * dx + dy * dy));
}

/** TSPLIB 95 documentation, section 2.5 (ATT, pseudo-Euclidean). */
export function att(a: [number, number], b: [number, number]): number {
  const dx = a[0] - b[0];
  const dy = a[1] - b[1];
  const r = Math.sqrt((dx * dx + dy * dy) / 10.0);
  const t = nint(r);
  return t < r ? t + 1 : t;
}

const PI = 3.141592;
const RRR = 6378.388;
// Truncation, not nint, for the degrees: the TSPLIB FAQ correction noted in the README.
function geoRad(x: number): number {
  const deg = Math.trunc(x);
  const min = x - deg;
  return (PI * (deg + (5.0 * min) / 3.0)) / 180.0;
}

/** TSPLIB 95 documentation, section 2.4 (GEO), with the FAQ's truncation of degrees. */
export function geo(a: [number, number], b: [number, number]): number {
  const latI = geoRad(a[0]);
  const lonI = geoRad(a[1]);
  const latJ = geoRad(b[0]);
  const lonJ = geoRad(b[1]);
  const q1 = Math.cos(lonI - lonJ);
  const q2 = Math.cos(latI - latJ);
  const q3 = Math.cos(latI + latJ);
  return Math.trunc(RRR * Math.acos(0.5 * ((1.0 + q1) * q2 - (1.0 - q1) * q3)) + 1.0);
}

const distanceOf: Record<EdgeWeightType, (a: [number, number], b: [number, number]) => number> = {
  EUC_2D: euc2d,
  ATT: att,
  GEO: geo,
};

/** Header keys may have spaces around the colon (README, parser notes). */
function header(lines: string[], key: string): string | undefined {
  for (const line of lines) {
    const m = /^\s*([A-Z_]+)\s*:\s*(.*?)\s*$/.exec(line);
    if (m && m[1] === key) return m[2];
  }
  return undefined;
}

export function parseTsp(text: string): TsplibInstance {
  const lines = text.split(/\r?\n/);
  const name = header(lines, 'NAME') ?? '';
  const type = header(lines, 'EDGE_WEIGHT_TYPE');
  if (type !== 'EUC_2D' && type !== 'ATT' && type !== 'GEO') throw new Error(`unsupported EDGE_WEIGHT_TYPE ${type}`);
  const dim = Number(header(lines, 'DIMENSION'));
  const start = lines.findIndex((l) => l.trim() === 'NODE_COORD_SECTION');
  if (start < 0) throw new Error('no NODE_COORD_SECTION');
  const coords: [number, number][] = new Array(dim);
  for (let i = start + 1; i < lines.length; i++) {
    const t = lines[i]!.trim();
    if (t === '' || t === 'EOF') break;
    const [id, x, y] = t.split(/\s+/).map(Number);
    coords[id! - 1] = [x!, y!];
  }
  for (let i = 0; i < dim; i++) if (!coords[i]) throw new Error(`missing coordinates for city ${i + 1}`);
  const f = distanceOf[type];
  return { name, type, coords, matrix: matrixFromFunction(dim, (i, j) => f(coords[i]!, coords[j]!)) };
}

/** A tour file lists 1-based cities, possibly several per line, ending with -1 and/or EOF. Returns 0-based. */
export function parseTour(text: string): number[] {
  const lines = text.split(/\r?\n/);
  const start = lines.findIndex((l) => l.trim() === 'TOUR_SECTION');
  if (start < 0) throw new Error('no TOUR_SECTION');
  const order: number[] = [];
  for (let i = start + 1; i < lines.length; i++) {
    const t = lines[i]!.trim();
    if (t === 'EOF') break;
    for (const tok of t.split(/\s+/)) {
      if (tok === '') continue;
      const v = Number(tok);
      if (v === -1) return order;
      order.push(v - 1);
    }
  }
  return order;
}

/** Loads `<name>.tsp`; `name` is the file stem (ulysses16.tsp's NAME header says "ulysses16.tsp"). */
export function loadTsp(name: string): TsplibInstance {
  return { ...parseTsp(readFileSync(join(TSPLIB_DIR, `${name}.tsp`), 'utf8')), name };
}

export function loadTour(name: string): number[] {
  return parseTour(readFileSync(join(TSPLIB_DIR, `${name}.opt.tour`), 'utf8'));
}
