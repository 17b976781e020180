import { execFileSync, spawnSync } from 'node:child_process';
import { describe, expect, it } from 'vitest';
import { memoryIo } from '../../../server/cli/io';
import { run as route } from '../../../server/cli/commands/route';
import { run as bound } from '../../../server/cli/commands/bound';
import { loadTsp, TSPLIB_OPTIMA } from '../../helpers/tsplib';

const square = {
  points: [
    [0, 0],
    [3, 0],
    [3, 4],
    [0, 4],
  ],
  depot: 0,
};

function rows(name: string): number[][] {
  const { matrix } = loadTsp(name);
  return Array.from({ length: matrix.n }, (_, i) => Array.from(matrix.d.subarray(i * matrix.n, (i + 1) * matrix.n)));
}

async function routeWith(args: string[], input: unknown): Promise<{ code: number; out: string[]; err: string[] }> {
  const io = memoryIo(typeof input === 'string' ? input : JSON.stringify(input));
  const code = await route(args, io);
  return { code, out: io.stdout, err: io.stderr };
}

describe('aislewright route (in process)', () => {
  it('prints method, improve, order from the depot and length including the walk back', async () => {
    const r = await routeWith(['--method', 'sorted-edges', '--improve', 'local'], square);
    expect(r.code).toBe(0);
    const body = JSON.parse(r.out[0]!);
    expect(Object.keys(body)).toEqual(['method', 'improve', 'order', 'length', 'ms']);
    // A 3 × 4 rectangle's perimeter (elementary geometry).
    expect(body).toMatchObject({ method: 'sorted-edges', improve: 'local', order: [0, 1, 2, 3], length: 14 });
  });

  it('solves burma14 exactly from a distance matrix', async () => {
    // TSPLIB optimum of burma14 (Reinelt 1991), GEO distance per the reference README.
    const r = await routeWith(['--method=exact'], { distances: rows('burma14'), depot: 3 });
    expect(r.code).toBe(0);
    const body = JSON.parse(r.out[0]!);
    expect(body.length).toBe(TSPLIB_OPTIMA.burma14);
    expect(body.order[0]).toBe(3);
    expect(new Set(body.order).size).toBe(14);
  });

  it('runs deep with a seed and a time limit', async () => {
    const r = await routeWith(['--method', 'nearest-neighbor', '--improve', 'deep', '--time-limit-ms', '50', '--seed', '3'], {
      distances: rows('ulysses22'),
      depot: 0,
    });
    expect(r.code).toBe(0);
    expect(JSON.parse(r.out[0]!).length).toBeGreaterThanOrEqual(TSPLIB_OPTIMA.ulysses22!);
    // From above: deep never lengthens nearest neighbor, at most (⌈log2 22⌉ + 1)/2 = 3 times the optimum on
    // metric instances (Rosenkrantz, Stearns & Lewis 1977).
    expect(JSON.parse(r.out[0]!).length).toBeLessThanOrEqual(3 * TSPLIB_OPTIMA.ulysses22!);
  });

  const bad: [string, string[], unknown, RegExp][] = [
    ['ragged matrix', ['--method', 'best'], { distances: [[0, 1], [1]], depot: 0 }, /row 1 has 1 entries/],
    [
      'asymmetric matrix',
      ['--method', 'best'],
      {
        distances: [
          [0, 1],
          [2, 0],
        ],
        depot: 0,
      },
      /not symmetric/,
    ],
    [
      'negative distance',
      ['--method', 'best'],
      {
        distances: [
          [0, -1],
          [-1, 0],
        ],
        depot: 0,
      },
      /negative/,
    ],
    [
      'non-finite distance',
      ['--method', 'best'],
      {
        distances: [
          [0, null],
          [null, 0],
        ],
        depot: 0,
      },
      /not a finite number/,
    ],
    [
      'depot out of range',
      ['--method', 'best'],
      {
        points: [
          [0, 0],
          [1, 1],
        ],
        depot: 2,
      },
      /depot 2 is out of range/,
    ],
    [
      'more than 16 stops for exact',
      ['--method', 'exact'],
      { points: Array.from({ length: 18 }, (_, i) => [i, 0]), depot: 0 },
      /limited to 16 stops; this trip has 17/,
    ],
    ['not JSON', ['--method', 'best'], '{oops', /not valid JSON/],
    ['both shapes', ['--method', 'best'], { points: [[0, 0]], distances: [[0]] }, /exactly one of/],
    ['bad point', ['--method', 'best'], { points: [[0, 0], [1]] }, /point 1 is not a pair/],
    ['missing method', [], square, /--method is required/],
    ['unknown method', ['--method', 'fastest'], square, /unknown method 'fastest'/],
    ['unknown improve', ['--method', 'best', '--improve', 'max'], square, /unknown improve mode 'max'/],
    ['bad time limit', ['--method', 'best', '--time-limit-ms', '-4'], square, /--time-limit-ms must be a non-negative number/],
    ['bad seed', ['--method', 'best', '--seed', '1.5'], square, /--seed must be an integer/],
    ['unknown option', ['--method', 'best', '--fast'], square, /unknown option --fast/],
  ];
  it.each(bad)('rejects %s with one line and exit 2', async (_, args, input, message) => {
    const r = await routeWith(args, input);
    expect(r.code).toBe(2);
    expect(r.out).toEqual([]);
    expect(r.err).toHaveLength(1);
    expect(r.err[0]).not.toContain('\n');
    expect(r.err[0]).toMatch(message);
  });
});

describe('aislewright bound (in process)', () => {
  it('prints a lower bound no greater than the optimum', async () => {
    // TSPLIB optimum of att48 (Reinelt 1991); the Held–Karp bound is below it and within 3 %.
    const io = memoryIo(JSON.stringify({ distances: rows('att48'), depot: 0 }));
    expect(await bound(['--time-limit-ms', '1000'], io)).toBe(0);
    const body = JSON.parse(io.stdout[0]!);
    expect(Object.keys(body)).toEqual(['lowerBound']);
    expect(body.lowerBound).toBeLessThanOrEqual(10628);
    expect(body.lowerBound).toBeGreaterThanOrEqual(0.97 * 10628);
  });

  it('rejects bad input with exit 2', async () => {
    const io = memoryIo(
      JSON.stringify({
        distances: [
          [0, 1],
          [1, 0],
        ],
        depot: -1,
      }),
    );
    expect(await bound([], io)).toBe(2);
    expect(io.stderr[0]).toMatch(/depot -1 is out of range/);
  });
});

describe('aislewright through node server/cli/bin.mjs', () => {
  const bin = new URL('../../../server/cli/bin.mjs', import.meta.url).pathname;
  it('answers route on stdin and exits 0', () => {
    const out = execFileSync('node', [bin, 'route', '--method', 'repeated-nearest-neighbor', '--improve', 'local'], {
      input: JSON.stringify(square),
      encoding: 'utf8',
    });
    expect(JSON.parse(out)).toMatchObject({ method: 'repeated-nearest-neighbor', order: [0, 1, 2, 3], length: 14 });
  });

  it('exits 2 with one line on stderr for an asymmetric matrix', () => {
    const r = spawnSync('node', [bin, 'route', '--method', 'best'], {
      input: JSON.stringify({
        distances: [
          [0, 1],
          [2, 0],
        ],
        depot: 0,
      }),
      encoding: 'utf8',
    });
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/not symmetric/);
  });
});
