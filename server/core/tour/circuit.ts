/** Small helpers on circuits shared by every tour method. */

/**
 * Rotates `order` in place to start at `depot`, then reverses the stops after the depot if needed so
 * the second entry is lower than the last: one fixed direction for a circuit and its mirror image.
 * O(n).
 */
export function canonicalize(order: number[], depot: number): number[] {
  const at = order.indexOf(depot);
  if (at < 0) throw new RangeError(`depot ${depot} is not on the circuit`);
  if (at > 0) {
    const head = order.splice(0, at);
    order.push(...head);
  }
  const k = order.length;
  if (k > 2 && order[1]! > order[k - 1]!) {
    for (let i = 1, j = k - 1; i < j; i++, j--) {
      const t = order[i]!;
      order[i] = order[j]!;
      order[j] = t;
    }
  }
  return order;
}

/** Each point's two neighbours on the circuit `order` (n ≥ 3): nb[2v], nb[2v + 1]. O(n). */
export function neighboursOf(order: ArrayLike<number>, n: number): Int32Array {
  const nb = new Int32Array(2 * n);
  for (let i = 0; i < n; i++) {
    const v = order[i]!;
    nb[2 * v] = order[i === 0 ? n - 1 : i - 1]!;
    nb[2 * v + 1] = order[i + 1 === n ? 0 : i + 1]!;
  }
  return nb;
}
