/**
 * The two kicks of the local searches (./local.ts, ./kopt.ts), applied in place on a circuit held as an
 * array of points: each write goes through the search's `put` (so its undo log sees it) and each point
 * whose edges changed is queued with `push` for the repair.
 */

export interface KickSite {
  /** The circuit, in order; `tour.length` points. */
  readonly tour: Int32Array;
  /** The search's comparison length between two points. */
  dist(a: number, b: number): number;
  /** Writes point c at array position p (logged by the search when it records). */
  put(p: number, c: number): void;
  /** Queues point c for the repair. */
  push(c: number): void;
}

export interface Kicks {
  /**
   * Double-bridge kick, local form (O. Martin, S. W. Otto & E. W. Felten, Complex Systems 5(3), 1991):
   * the segments of `l1` and `l2` points starting at array position `at` swap places (… a B C e … →
   * … a C B e …); the six ends are queued. Returns the length change. O(l1 + l2).
   */
  swapSegments(at: number, l1: number, l2: number): number;
  /**
   * Double bridge (D. S. Johnson & L. A. McGeoch, 1997: A1 A2 A3 A4 → A1 A4 A3 A2), local form: the
   * three segments of `l1`, `l2` and `l3` points starting at array position `at` are put in reverse
   * order, each the same way round (… a S1 S2 S3 e … → … a S3 S2 S1 e …); the eight ends are queued.
   * Returns the length change. O(l1 + l2 + l3).
   */
  doubleBridge(at: number, l1: number, l2: number, l3: number): number;
}

export function createKicks(site: KickSite): Kicks {
  const { tour, dist, put, push } = site;
  const n = tour.length;
  let buf = new Int32Array(64);
  const scratch = (len: number): Int32Array => (buf.length >= len ? buf : (buf = new Int32Array(2 * len)));
  const at_ = (p: number): number => tour[p % n]!;
  return {
    swapSegments(at, l1, l2) {
      const a = at_(at - 1 + n);
      const b1 = at_(at);
      const b2 = at_(at + l1 - 1);
      const c1 = at_(at + l1);
      const c2 = at_(at + l1 + l2 - 1);
      const e = at_(at + l1 + l2);
      const delta = dist(a, c1) + dist(c2, b1) + dist(b2, e) - dist(a, b1) - dist(b2, c1) - dist(c2, e);
      const L = l1 + l2;
      const sb = scratch(L);
      for (let x = 0; x < l2; x++) sb[x] = at_(at + l1 + x);
      for (let x = 0; x < l1; x++) sb[l2 + x] = at_(at + x);
      for (let x = 0; x < L; x++) put((at + x) % n, sb[x]!);
      for (const c of [a, b1, b2, c1, c2, e]) push(c);
      return delta;
    },
    doubleBridge(at, l1, l2, l3) {
      const at2 = at + l1;
      const at3 = at2 + l2;
      const L = l1 + l2 + l3;
      const a = at_(at - 1 + n);
      const s1 = at_(at);
      const e1 = at_(at2 - 1);
      const s2 = at_(at2);
      const e2 = at_(at3 - 1);
      const s3 = at_(at3);
      const e3 = at_(at + L - 1);
      const e = at_(at + L);
      const delta = dist(a, s3) + dist(e3, s2) + dist(e2, s1) + dist(e1, e) - dist(a, s1) - dist(e1, s2) - dist(e2, s3) - dist(e3, e);
      const sb = scratch(L);
      let x = 0;
      for (let y = 0; y < l3; y++) sb[x++] = at_(at3 + y);
      for (let y = 0; y < l2; y++) sb[x++] = at_(at2 + y);
      for (let y = 0; y < l1; y++) sb[x++] = at_(at + y);
      for (let y = 0; y < L; y++) put((at + y) % n, sb[y]!);
      for (const c of [a, s1, e1, s2, e2, s3, e3, e]) push(c);
      return delta;
    },
  };
}
