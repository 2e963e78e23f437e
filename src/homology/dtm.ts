/**
 * Distance-to-measure (DTM) values and the DTM-weighted Rips filtration with p = 1 (Anai, Chazal, Glisse, Ike,
 * Inakoshi, Tinarrage & Umeda, "DTM-based filtrations", 2019).
 *
 * The empirical DTM with mass m = K/n at a point x of the sample is
 *   f(x) = sqrt( (1/K) · Σ_{j=1..K} ‖x − x_(j)‖² ),
 * where x_(1), …, x_(K) are the K nearest sample points to x. As in the paper, x is one of its own neighbours
 * (x_(1) = x at distance 0), so K = 1 gives f = 0 and the plain Rips filtration (with radii doubled, see below).
 *
 * Weighted Rips with p = 1: vertex x enters at f(x); edge xy enters at
 *   max(f(x), f(y))            when ‖x − y‖ ≤ |f(x) − f(y)|,
 *   (f(x) + f(y) + ‖x − y‖)/2  otherwise,
 * i.e. at max(f(x), f(y), (f(x) + f(y) + ‖x − y‖)/2); higher simplices enter at their longest edge, as in
 * Rips. The values are radii of balls (an edge of two points with f = 0 enters at half its length), so a DTM
 * diagram is on half the scale of a plain Rips diagram on distances. Outliers get large f and enter late:
 * their H0 bars start late and are short instead of long.
 */
import type { Diagram } from '../core/diagram.js';
import { condenseMatrix, type Metric, pairwiseDistances } from './metric.js';
import { nearestNeighbours, nearestNeighboursFromMatrix } from './nearest.js';
import { checkRipsFloor, type RipsOptions, ripsPersistence } from './rips.js';

export interface DtmOptions {
  /** Highest homology degree, 0–2. */
  maxDegree: 0 | 1 | 2;
  /** Largest filtration value kept (default: the engine's enclosing radius). */
  maxScale?: number;
  /** Metric of the cloud. Default 'euclidean' (neighbours through the k-d tree); others scan all pairs. */
  metric?: Metric;
  /** Passed to the Rips engine. */
  memoryLimit?: number;
}

/**
 * Diagrams of the DTM filtration of a point cloud with K neighbours: DTM values as vertex values, the p = 1
 * edge rule, and the Rips engine for everything above edges.
 */
export function dtmPersistence(
  coords: Float64Array,
  count: number,
  dim: number,
  k: number,
  options: DtmOptions,
): Diagram[] {
  const metric = options.metric ?? 'euclidean';
  checkRipsFloor(count, { withVertexValues: true, memoryLimit: options.memoryLimit, what: 'DTM' });
  const condensed = pairwiseDistances(coords, count, dim, metric);
  const f =
    metric === 'euclidean' ? dtmValues(coords, count, dim, k) : dtmValuesFromCondensed(condensed, count, k);
  return weightedRips(count, condensed, f, options);
}

/** Diagrams of the DTM filtration from a full `size × size` distance matrix. */
export function dtmPersistenceFromMatrix(
  matrix: Float64Array,
  size: number,
  k: number,
  options: DtmOptions,
): Diagram[] {
  checkRipsFloor(size, { withVertexValues: true, memoryLimit: options.memoryLimit, what: 'DTM' });
  const f = dtmValuesFromMatrix(matrix, size, k);
  return weightedRips(size, condenseMatrix(matrix, size), f, options);
}

function weightedRips(n: number, condensed: Float64Array, f: Float64Array, options: DtmOptions): Diagram[] {
  const edges = dtmEdgeValues(condensed, f);
  const rips: RipsOptions = { maxDegree: options.maxDegree, vertexValues: f };
  if (options.maxScale !== undefined) rips.maxScale = options.maxScale;
  if (options.memoryLimit !== undefined) rips.memoryLimit = options.memoryLimit;
  return ripsPersistence(n, edges, rips);
}

/** DTM values of the points of a cloud (row-major `coords`), with K nearest neighbours, self included. */
export function dtmValues(coords: ArrayLike<number>, count: number, dim: number, k: number): Float64Array {
  return valuesFromTable(
    nearestNeighbours(coords, count, dim, k, { includeSelf: true }).squaredDistances,
    count,
    k,
  );
}

/** DTM values from a full `size × size` distance matrix (row-major), K nearest neighbours, self included. */
export function dtmValuesFromMatrix(matrix: ArrayLike<number>, size: number, k: number): Float64Array {
  return valuesFromTable(
    nearestNeighboursFromMatrix(matrix, size, k, { includeSelf: true }).squaredDistances,
    size,
    k,
  );
}

function valuesFromTable(squared: Float64Array, count: number, k: number): Float64Array {
  const f = new Float64Array(count);
  // Invariant: f[i] is the DTM of point i for every i already visited.
  for (let i = 0; i < count; i++) {
    let s = 0;
    for (let j = 0; j < k; j++) s += squared[i * k + j];
    f[i] = Math.sqrt(s / k);
  }
  return f;
}

/** The filtration value of an edge of length `distance` between points with DTM values fx and fy (p = 1). */
export function dtmEdgeValue(fx: number, fy: number, distance: number): number {
  const high = fx > fy ? fx : fy;
  const joined = (fx + fy + distance) / 2;
  return joined > high ? joined : high;
}

/**
 * Edge values of the DTM filtration from condensed pairwise distances, in the Rips engine's layout (the pair
 * i < j at j(j−1)/2 + i, see simplex-index.ts), and the DTM values `f` of the n points. Same layout out.
 */
export function dtmEdgeValues(condensed: ArrayLike<number>, f: ArrayLike<number>): Float64Array {
  const n = f.length;
  const out = new Float64Array((n * (n - 1)) / 2);
  let e = 0;
  // Invariant: e is the condensed index of the pair (i, j), and out[0, e) is filled.
  for (let j = 1; j < n; j++) {
    const fj = f[j];
    for (let i = 0; i < j; i++, e++) {
      const fi = f[i];
      const high = fi > fj ? fi : fj;
      const joined = (fi + fj + condensed[e]) / 2;
      out[e] = joined > high ? joined : high;
    }
  }
  return out;
}

/** DTM values from condensed pairwise distances (engine layout), K nearest neighbours, self included. */
export function dtmValuesFromCondensed(condensed: ArrayLike<number>, n: number, k: number): Float64Array {
  const matrix = new Float64Array(n * n);
  let e = 0;
  for (let j = 1; j < n; j++) {
    for (let i = 0; i < j; i++, e++) {
      matrix[i * n + j] = condensed[e];
      matrix[j * n + i] = condensed[e];
    }
  }
  return dtmValuesFromMatrix(matrix, n, k);
}

/** Checks a DTM neighbour count K against the size of a sample; returns a message for the user or undefined. */
export function dtmProblem(k: number, count: number): string | undefined {
  if (!Number.isInteger(k) || k < 1)
    return `dtm:${k} needs a whole number of neighbours K ≥ 1 (for example dtm:10)`;
  if (k > count)
    return `dtm:${k} asks for ${k} neighbours but the sample has only ${count} points; use K ≤ ${count}`;
  return undefined;
}
