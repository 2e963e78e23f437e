/**
 * Disjoint sets on typed arrays with path halving and union by size. Each root also remembers the oldest
 * member of its set (smallest birth, ties to the smaller index) so that merges follow the elder rule.
 */
export class UnionFind {
  readonly parent: Int32Array;
  readonly size: Int32Array;
  /** For a root: the member with the smallest birth in its set. */
  readonly oldest: Int32Array;

  constructor(n: number) {
    this.parent = new Int32Array(n);
    this.size = new Int32Array(n).fill(1);
    this.oldest = new Int32Array(n);
    for (let i = 0; i < n; i++) {
      this.parent[i] = i;
      this.oldest[i] = i;
    }
  }

  find(x: number): number {
    const p = this.parent;
    // invariant: x walks towards its root; every visited node is re-pointed to its grandparent
    while (p[x] !== x) {
      p[x] = p[p[x]];
      x = p[x];
    }
    return x;
  }

  /** Joins the sets of roots ra and rb (ra ≠ rb); `oldest` of the new root is `keepOldest`. Returns the new root. */
  link(ra: number, rb: number, keepOldest: number): number {
    let root = ra;
    let child = rb;
    if (this.size[ra] < this.size[rb]) {
      root = rb;
      child = ra;
    }
    this.parent[child] = root;
    this.size[root] += this.size[child];
    this.oldest[root] = keepOldest;
    return root;
  }
}
