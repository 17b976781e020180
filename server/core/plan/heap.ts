/**
 * Binary min-heap of (key, id) pairs in parallel typed arrays, for Dijkstra with lazy deletion.
 * Ties on the key pop the smaller id first, so runs are deterministic whatever the push order.
 */
export class MinHeap {
  private keys: Float64Array;
  private ids: Int32Array;
  size = 0;

  constructor(capacity: number) {
    this.keys = new Float64Array(Math.max(1, capacity));
    this.ids = new Int32Array(Math.max(1, capacity));
  }

  clear(): void {
    this.size = 0;
  }

  /** O(log n); grows the arrays when full. */
  push(key: number, id: number): void {
    if (this.size === this.keys.length) this.grow();
    const keys = this.keys;
    const ids = this.ids;
    let i = this.size++;
    while (i > 0) {
      const p = (i - 1) >> 1;
      const pk = keys[p]!;
      if (pk < key || (pk === key && ids[p]! <= id)) break;
      keys[i] = pk;
      ids[i] = ids[p]!;
      i = p;
    }
    keys[i] = key;
    ids[i] = id;
  }

  /** Key of the top entry; call only when size > 0. */
  peekKey(): number {
    return this.keys[0]!;
  }

  /** Removes the top entry and returns its id; call only when size > 0. O(log n). */
  pop(): number {
    const keys = this.keys;
    const ids = this.ids;
    const top = ids[0]!;
    const n = --this.size;
    if (n === 0) return top;
    const key = keys[n]!;
    const id = ids[n]!;
    let i = 0;
    for (;;) {
      let c = 2 * i + 1;
      if (c >= n) break;
      const r = c + 1;
      if (r < n && (keys[r]! < keys[c]! || (keys[r] === keys[c] && ids[r]! < ids[c]!))) c = r;
      const ck = keys[c]!;
      if (key < ck || (key === ck && id <= ids[c]!)) break;
      keys[i] = ck;
      ids[i] = ids[c]!;
      i = c;
    }
    keys[i] = key;
    ids[i] = id;
    return top;
  }

  private grow(): void {
    const keys = new Float64Array(this.keys.length * 2);
    const ids = new Int32Array(this.ids.length * 2);
    keys.set(this.keys);
    ids.set(this.ids);
    this.keys = keys;
    this.ids = ids;
  }
}
