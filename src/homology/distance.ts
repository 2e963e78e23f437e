import type { Diagram } from '../core/diagram.js';
import { maximumMatching, solveAssignment } from './assignment.js';

/**
 * Distances between persistence diagrams of one degree. Points off the diagonal may be matched to each
 * other or to the diagonal; essential classes (death +Infinity) are matched among themselves, by birth,
 * and the distance is +Infinity when the two diagrams have different numbers of them (Cohen-Steiner,
 * Edelsbrunner and Harer, "Stability of persistence diagrams", 2007). Pairs of zero length lie on the
 * diagonal and cost nothing.
 */

interface Split {
  /** Finite off-diagonal points. */
  births: Float64Array;
  deaths: Float64Array;
  /** Births of the essential classes, sorted ascending. */
  essential: Float64Array;
}

function split(diagram: Diagram, which: string): Split {
  const { births, deaths } = diagram;
  let finite = 0;
  let essential = 0;
  for (let i = 0; i < births.length; i++) {
    const b = births[i];
    const d = deaths[i];
    if (Number.isNaN(b) || Number.isNaN(d) || !Number.isFinite(b) || d === -Infinity || d < b) {
      throw new Error(
        `pair ${i} of diagram ${which} is (${b}, ${d}); births must be finite and deaths not before births`,
      );
    }
    if (d === Infinity) essential++;
    else if (d > b) finite++;
  }
  const out: Split = {
    births: new Float64Array(finite),
    deaths: new Float64Array(finite),
    essential: new Float64Array(essential),
  };
  for (let i = 0, f = 0, e = 0; i < births.length; i++) {
    const d = deaths[i];
    if (d === Infinity) out.essential[e++] = births[i];
    else if (d > births[i]) {
      out.births[f] = births[i];
      out.deaths[f++] = d;
    }
  }
  out.essential.sort();
  return out;
}

/** L_q distance between points (b1, d1) and (b2, d2); q = Infinity gives the L∞ distance. */
function pointDistance(b1: number, d1: number, b2: number, d2: number, q: number): number {
  const x = Math.abs(b1 - b2);
  const y = Math.abs(d1 - d2);
  if (q === Infinity) return x > y ? x : y;
  if (q === 1) return x + y;
  if (q === 2) return Math.hypot(x, y);
  return (x ** q + y ** q) ** (1 / q);
}

/** L_q distance from (b, d) to the diagonal, reached at its projection ((b+d)/2, (b+d)/2). */
function diagonalDistance(b: number, d: number, q: number): number {
  const half = (d - b) / 2;
  return q === Infinity ? half : half * 2 ** (1 / q);
}

/**
 * The bottleneck distance: the least δ such that a matching moves no point more than δ in L∞ (points may
 * go to the diagonal). Exact: the answer is one of the candidate values (point-to-point and
 * point-to-diagonal distances); they are sorted and searched by bisection, each step testing whether the
 * points far from the diagonal can all be matched within δ (`matchable`).
 */
export function bottleneckDistance(a: Diagram, b: Diagram): number {
  const A = split(a, 'a');
  const B = split(b, 'b');
  if (A.essential.length !== B.essential.length) return Infinity;
  let essential = 0;
  for (let i = 0; i < A.essential.length; i++)
    essential = Math.max(essential, Math.abs(A.essential[i] - B.essential[i]));
  const n = A.births.length;
  const m = B.births.length;
  if (n + m === 0) return essential;
  const cross = new Float64Array(n * m);
  const diagA = new Float64Array(n);
  const diagB = new Float64Array(m);
  for (let i = 0; i < n; i++) {
    diagA[i] = diagonalDistance(A.births[i], A.deaths[i], Infinity);
    for (let j = 0; j < m; j++)
      cross[i * m + j] = pointDistance(A.births[i], A.deaths[i], B.births[j], B.deaths[j], Infinity);
  }
  for (let j = 0; j < m; j++) diagB[j] = diagonalDistance(B.births[j], B.deaths[j], Infinity);
  // Every point may go to the diagonal, so the largest diagonal distance always admits a matching: only
  // candidates up to it matter.
  let hiValue = 0;
  for (let i = 0; i < n; i++) hiValue = Math.max(hiValue, diagA[i]);
  for (let j = 0; j < m; j++) hiValue = Math.max(hiValue, diagB[j]);
  let count = 0;
  const all = n * m + n + m;
  const candidates = new Float64Array(all);
  for (let k = 0; k < n * m; k++) if (cross[k] <= hiValue) candidates[count++] = cross[k];
  for (let i = 0; i < n; i++) candidates[count++] = diagA[i];
  for (let j = 0; j < m; j++) candidates[count++] = diagB[j];
  const sorted = candidates.subarray(0, count).sort();
  let lo = 0;
  let hi = upperIndex(sorted, hiValue);
  // Invariant: sorted[hi] admits a matching; every candidate below index lo does not.
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (matchable(sorted[mid], n, m, cross, diagA, diagB)) hi = mid;
    else lo = mid + 1;
  }
  return Math.max(essential, sorted[hi]);
}

function upperIndex(sorted: Float64Array, value: number): number {
  let lo = 0;
  let hi = sorted.length - 1;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (sorted[mid] >= value) hi = mid;
    else lo = mid + 1;
  }
  return lo;
}

/**
 * Whether a matching moving no point more than δ exists. A point farther than δ from the diagonal must be
 * matched to a point of the other diagram within δ; the others may go to the diagonal. A matching of the
 * two diagrams that covers both forced sets exists exactly when one covers the forced points of A and
 * another covers those of B (Mendelsohn and Dulmage, "Some generalizations of the problem of distinct
 * representatives", 1958), so two one-sided maximum matchings (Hopcroft–Karp) decide it.
 */
function matchable(
  delta: number,
  n: number,
  m: number,
  cross: Float64Array,
  diagA: Float64Array,
  diagB: Float64Array,
): boolean {
  return (
    coversForced(delta, n, m, diagA, (i, j) => cross[i * m + j]) &&
    coversForced(delta, m, n, diagB, (j, i) => cross[i * m + j])
  );
}

function coversForced(
  delta: number,
  n: number,
  m: number,
  diag: Float64Array,
  cost: (i: number, j: number) => number,
): boolean {
  let forced = 0;
  for (let i = 0; i < n; i++) if (diag[i] > delta) forced++;
  if (forced === 0) return true;
  if (forced > m) return false;
  const offsets = new Int32Array(forced + 1);
  const columns = new Int32Array(forced * m);
  let edges = 0;
  for (let i = 0, r = 0; i < n; i++) {
    if (!(diag[i] > delta)) continue;
    for (let j = 0; j < m; j++) if (cost(i, j) <= delta) columns[edges++] = j;
    if (edges === offsets[r]) return false;
    offsets[++r] = edges;
  }
  return maximumMatching(forced, m, offsets, columns.subarray(0, edges)) === forced;
}

/**
 * The p-Wasserstein distance (Σ over a best matching of moved distance^p)^(1/p), with ground metric
 * L_internal between points (L∞ by default). Exact, by a minimum-cost assignment on the (n+m)×(n+m)
 * matrix of the two diagrams plus diagonal copies. p = Infinity gives the bottleneck distance (for the
 * L∞ ground metric). Essential classes are matched among themselves in order of birth, which is optimal
 * for any p ≥ 1 on a line.
 */
export function wassersteinDistance(a: Diagram, b: Diagram, p = 2, internal = Infinity): number {
  if (!(p >= 1)) throw new Error(`Wasserstein order p = ${p} must be ≥ 1`);
  if (!(internal >= 1)) throw new Error(`ground metric order ${internal} must be ≥ 1`);
  if (p === Infinity && internal === Infinity) return bottleneckDistance(a, b);
  if (p === Infinity)
    throw new Error('p = Infinity is supported with the L∞ ground metric only (the bottleneck distance)');
  const A = split(a, 'a');
  const B = split(b, 'b');
  if (A.essential.length !== B.essential.length) return Infinity;
  let total = 0;
  for (let i = 0; i < A.essential.length; i++) total += Math.abs(A.essential[i] - B.essential[i]) ** p;
  const n = A.births.length;
  const m = B.births.length;
  if (n + m > 0) {
    const size = n + m;
    const cost = new Float64Array(size * size);
    let admissible = 0;
    for (let i = 0; i < n; i++) admissible += diagonalDistance(A.births[i], A.deaths[i], internal) ** p;
    for (let j = 0; j < m; j++) admissible += diagonalDistance(B.births[j], B.deaths[j], internal) ** p;
    // Sending every point to the diagonal costs `admissible`; a forbidden entry costs more than that.
    const forbidden = 2 * admissible + 1;
    cost.fill(forbidden);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < m; j++) {
        cost[i * size + j] = pointDistance(A.births[i], A.deaths[i], B.births[j], B.deaths[j], internal) ** p;
      }
      cost[i * size + m + i] = diagonalDistance(A.births[i], A.deaths[i], internal) ** p;
    }
    for (let j = 0; j < m; j++) {
      const row = (n + j) * size;
      cost[row + j] = diagonalDistance(B.births[j], B.deaths[j], internal) ** p;
      for (let i = 0; i < n; i++) cost[row + m + i] = 0;
    }
    total += solveAssignment(cost, size).total;
  }
  return total ** (1 / p);
}

/** Which diagram distance: bottleneck, or p-Wasserstein with the L∞ ground metric. */
export type DiagramMetric = { kind: 'bottleneck' } | { kind: 'wasserstein'; p: number };

export interface DistanceMatrixOptions {
  /** The distance (default bottleneck). */
  metric?: DiagramMetric;
  /** Called after each row with (pairs done, pairs in total). */
  onProgress?: (done: number, total: number) => void;
}

/**
 * Distances between every diagram of `rows` and every diagram of `columns`, row-major rows × columns.
 * Without `columns`, the symmetric matrix of `rows` (zero diagonal; each pair computed once).
 */
export function distanceMatrix(
  rows: readonly Diagram[],
  columns?: readonly Diagram[],
  options: DistanceMatrixOptions = {},
): { rows: number; cols: number; data: Float64Array } {
  const metric = options.metric ?? { kind: 'bottleneck' };
  const distance = (a: Diagram, b: Diagram): number =>
    metric.kind === 'bottleneck' ? bottleneckDistance(a, b) : wassersteinDistance(a, b, metric.p);
  const symmetric = columns === undefined;
  const cols = columns ?? rows;
  const n = rows.length;
  const m = cols.length;
  const data = new Float64Array(n * m);
  const total = symmetric ? (n * (n - 1)) / 2 : n * m;
  let done = 0;
  for (let i = 0; i < n; i++) {
    for (let j = symmetric ? i + 1 : 0; j < m; j++) {
      const value = distance(rows[i], cols[j]);
      data[i * m + j] = value;
      if (symmetric) data[j * m + i] = value;
      done++;
    }
    options.onProgress?.(done, total);
  }
  return { rows: n, cols: m, data };
}
