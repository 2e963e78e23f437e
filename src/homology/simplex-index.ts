/**
 * Simplices as numbers: the combinatorial number system. A k-simplex with vertices v_k > … > v_1 > v_0 has
 * the index C(v_k, k+1) + … + C(v_1, 2) + C(v_0, 1), a bijection onto 0 … C(n, k+1) − 1 (colexicographic
 * order). Cofacets and facets are then found by arithmetic, never by storing a boundary matrix.
 *
 * Encoding choice: indices are JavaScript doubles, exact while below 2^53. `maxVertexCount(k)` gives the
 * largest vertex count whose (k)-simplices all stay exact; the engine checks it before computing degree
 * k − 1 (whose reduction indexes k-simplices), e.g. about 21,000 vertices for tetrahedra (H2) and 380,000 for triangles (H1).
 */

/** Index of the edge {i, j} (i ≠ j) in the condensed edge array: j(j−1)/2 + i for i < j (column-wise lower triangle). */
export function condensedIndex(i: number, j: number, n: number): number {
  if (i === j || i < 0 || j < 0 || i >= n || j >= n)
    throw new RangeError(`no edge between ${i} and ${j} among ${n} vertices`);
  return i < j ? (j * (j - 1)) / 2 + i : (i * (i - 1)) / 2 + j;
}

/** Length of the condensed edge array of n vertices: n(n−1)/2. */
export function condensedLength(n: number): number {
  return (n * (n - 1)) / 2;
}

/** The endpoints [i, j] with i < j of the edge at condensed index `e`. */
export function edgeEndpoints(e: number): [number, number] {
  const j = edgeHighVertex(e);
  return [e - (j * (j - 1)) / 2, j];
}

/** The larger endpoint of the edge at condensed index `e`. */
export function edgeHighVertex(e: number): number {
  let j = Math.floor((1 + Math.sqrt(1 + 8 * e)) / 2);
  while ((j * (j - 1)) / 2 > e) j--;
  while (((j + 1) * j) / 2 <= e) j++;
  return j;
}

/** C(v, k) for v in 0 … n and k in 0 … maxK, as doubles; row k is a Float64Array `row(k)`. */
export class BinomialTable {
  readonly n: number;
  readonly maxK: number;
  private readonly rows: Float64Array[];

  constructor(n: number, maxK: number) {
    this.n = n;
    this.maxK = maxK;
    this.rows = [];
    for (let k = 0; k <= maxK; k++) {
      const row = new Float64Array(n + 1);
      for (let v = 0; v <= n; v++) row[v] = binomial(v, k);
      this.rows.push(row);
    }
  }

  /** Row k: `row(k)[v] = C(v, k)`. */
  row(k: number): Float64Array {
    return this.rows[k];
  }

  /** The largest vertex v ≤ top with C(v, k) ≤ index (binary search). */
  maxVertex(index: number, k: number, top: number): number {
    const row = this.rows[k];
    let lo = k - 1;
    let hi = top;
    // invariant: C(lo, k) ≤ index (C(k−1, k) = 0) and the answer lies in [lo, hi]
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (row[mid] <= index) lo = mid;
      else hi = mid - 1;
    }
    return lo;
  }

  /** The vertices of the (k−1)-simplex (k vertices) at `index`, largest first, written into `out`. */
  vertices(index: number, k: number, out: Int32Array | number[]): void {
    let top = this.n - 1;
    let rest = index;
    for (let m = k; m >= 1; m--) {
      const v = this.maxVertex(rest, m, top);
      out[k - m] = v;
      rest -= this.rows[m][v];
      top = v - 1;
    }
  }
}

/** C(v, k) as a double (exact while the result is below 2^53). */
export function binomial(v: number, k: number): number {
  if (k < 0 || k > v) return 0;
  let r = 1;
  const kk = Math.min(k, v - k);
  for (let m = 1; m <= kk; m++) r = (r * (v - kk + m)) / m;
  return Math.round(r);
}

/** The largest vertex count n for which every simplex with `vertices` vertices has an index below 2^53. */
export function maxVertexCount(vertices: number): number {
  let lo = vertices;
  let hi = 1 << 30;
  while (lo < hi) {
    const mid = Math.floor((lo + hi + 1) / 2);
    if (binomial(mid, vertices) <= Number.MAX_SAFE_INTEGER) lo = mid;
    else hi = mid - 1;
  }
  return lo;
}
