/**
 * The order of an array of values, ascending, ties by increasing position — without a comparison callback:
 * a native sort of the values, a rank per value by binary search, then a stable counting sort.
 */
export function argsortValues(values: Float64Array): Int32Array {
  const m = values.length;
  const sorted = Float64Array.from(values).sort();
  let distinct = 0;
  for (let k = 0; k < m; k++) if (k === 0 || sorted[k] !== sorted[k - 1]) sorted[distinct++] = sorted[k];
  const counts = new Int32Array(distinct + 1);
  const rank = new Int32Array(m);
  for (let p = 0; p < m; p++) {
    const v = values[p];
    let lo = 0;
    let hi = distinct - 1;
    // invariant: the rank of v lies in [lo, hi]
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (sorted[mid] < v) lo = mid + 1;
      else hi = mid;
    }
    rank[p] = lo;
    counts[lo + 1]++;
  }
  for (let r = 0; r < distinct; r++) counts[r + 1] += counts[r];
  const order = new Int32Array(m);
  // invariant: positions before p are placed, each bucket in increasing position
  for (let p = 0; p < m; p++) order[counts[rank[p]]++] = p;
  return order;
}

/** Throws a RangeError naming the first NaN among `values`. */
export function checkNoNaN(values: Float64Array, what: string): void {
  for (let p = 0; p < values.length; p++) {
    if (Number.isNaN(values[p])) throw new RangeError(`${what} has a missing value (NaN) at position ${p}`);
  }
}
