/** Disjoint sets over points 0…n−1 (union–find with path halving; textbook, e.g. Cormen et al., Introduction to Algorithms, ch. 21). */
export interface DisjointSets {
  /** The representative of x's set. */
  find(x: number): number;
  /** Puts a's set into b's. */
  union(a: number, b: number): void;
}

export function createDisjointSets(n: number): DisjointSets {
  const parent = new Int32Array(n);
  for (let i = 0; i < n; i++) parent[i] = i;
  const find = (x: number): number => {
    while (parent[x] !== x) {
      parent[x] = parent[parent[x]!]!;
      x = parent[x]!;
    }
    return x;
  };
  return {
    find,
    union(a, b) {
      parent[find(a)] = find(b);
    },
  };
}
