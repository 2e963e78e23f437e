/** Distances between points, as the condensed edge array the Rips engine reads (see condensedIndex). */
export type Metric = 'euclidean' | 'manhattan' | 'chebyshev';

export const METRICS: readonly Metric[] = ['euclidean', 'manhattan', 'chebyshev'];

/**
 * Pairwise distances of `count` points in `dim` dimensions (row-major `coords`), condensed: the distance
 * between i < j sits at j(j−1)/2 + i.
 */
export function pairwiseDistances(
  coords: Float64Array,
  count: number,
  dim: number,
  metric: Metric = 'euclidean',
): Float64Array {
  if (coords.length !== count * dim)
    throw new RangeError(
      `coords has ${coords.length} numbers; ${count} points in ${dim} dimensions need ${count * dim}`,
    );
  const out = new Float64Array((count * (count - 1)) / 2);
  let e = 0;
  for (let j = 1; j < count; j++) {
    const oj = j * dim;
    // invariant: e is the condensed index of (i, j)
    for (let i = 0; i < j; i++, e++) {
      const oi = i * dim;
      let acc = 0;
      if (metric === 'euclidean') {
        for (let d = 0; d < dim; d++) {
          const x = coords[oi + d] - coords[oj + d];
          acc += x * x;
        }
        acc = Math.sqrt(acc);
      } else if (metric === 'manhattan') {
        for (let d = 0; d < dim; d++) acc += Math.abs(coords[oi + d] - coords[oj + d]);
      } else {
        for (let d = 0; d < dim; d++) {
          const x = Math.abs(coords[oi + d] - coords[oj + d]);
          if (x > acc) acc = x;
        }
      }
      out[e] = acc;
    }
  }
  return out;
}

/** The condensed edge array of a full symmetric `size` × `size` matrix (row-major), using its upper triangle. */
export function condenseMatrix(matrix: Float64Array, size: number): Float64Array {
  const out = new Float64Array((size * (size - 1)) / 2);
  let e = 0;
  for (let j = 1; j < size; j++) for (let i = 0; i < j; i++) out[e++] = matrix[i * size + j];
  return out;
}
