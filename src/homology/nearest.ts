/**
 * k nearest neighbours of every point of a cloud, through a k-d tree on typed arrays (Bentley, "Multidimensional
 * binary search trees used for associative searching", 1975; Friedman, Bentley & Finkel, "An algorithm for
 * finding best matches in logarithmic expected time", 1977).
 *
 * Why our own tree: the well-kept npm spatial indexes are two-dimensional and answer range queries; the
 * distance-to-measure needs k nearest neighbours in any dimension. In high dimension a tree degenerates to a
 * scan, so above `KD_TREE_MAX_DIMENSION` we scan directly (same result, less overhead).
 */

/** The k nearest neighbours of each point: row i holds k indices and squared distances, nearest first. */
export interface NeighbourTable {
  count: number;
  k: number;
  /** `count × k`, row-major. */
  indices: Int32Array;
  /** `count × k`, row-major, ascending within a row. */
  squaredDistances: Float64Array;
}

export interface NearestOptions {
  /** Whether a point counts as its own neighbour (at distance 0). Default true (the empirical DTM's convention). */
  includeSelf?: boolean;
  /** Points per leaf of the tree. Default 12. */
  leafSize?: number;
}

/** Above this dimension the tree is skipped for a direct scan. Common practice, no source. */
export const KD_TREE_MAX_DIMENSION = 12;

/** A static k-d tree over `count` points of `dim` coordinates (row-major `coords`). */
export class KdTree {
  readonly count: number;
  readonly dim: number;
  private readonly coords: ArrayLike<number>;
  /** Points in tree order: each node owns the slice `order[start, end)`. */
  private readonly order: Int32Array;
  private readonly nodeStart: Int32Array;
  private readonly nodeEnd: Int32Array;
  /** Split axis, or −1 for a leaf. */
  private readonly nodeAxis: Int32Array;
  private readonly nodeSplit: Float64Array;
  private readonly nodeLeft: Int32Array;
  private readonly nodeRight: Int32Array;
  private nodeCount = 0;

  constructor(coords: ArrayLike<number>, count: number, dim: number, leafSize = 12) {
    this.coords = coords;
    this.count = count;
    this.dim = dim;
    this.order = new Int32Array(count);
    for (let i = 0; i < count; i++) this.order[i] = i;
    // Median splits stop at ≤ leafSize points, so leaves hold ≥ leafSize/2 and there are < 4·count/leafSize nodes.
    const capacity = 4 * Math.ceil(count / Math.max(1, leafSize)) + 3;
    this.nodeStart = new Int32Array(capacity);
    this.nodeEnd = new Int32Array(capacity);
    this.nodeAxis = new Int32Array(capacity);
    this.nodeSplit = new Float64Array(capacity);
    this.nodeLeft = new Int32Array(capacity);
    this.nodeRight = new Int32Array(capacity);
    this.build(0, count, Math.max(1, leafSize));
  }

  private build(start: number, end: number, leafSize: number): number {
    const node = this.nodeCount++;
    this.nodeStart[node] = start;
    this.nodeEnd[node] = end;
    this.nodeAxis[node] = -1;
    if (end - start <= leafSize) return node;
    // Split on the axis of widest spread, at the median.
    const { coords, order, dim } = this;
    let axis = 0;
    let widest = -1;
    for (let a = 0; a < dim; a++) {
      let lo = Infinity;
      let hi = -Infinity;
      // Invariant: lo/hi are the extremes of axis a over order[start, i).
      for (let i = start; i < end; i++) {
        const v = coords[order[i] * dim + a];
        if (v < lo) lo = v;
        if (v > hi) hi = v;
      }
      if (hi - lo > widest) {
        widest = hi - lo;
        axis = a;
      }
    }
    if (widest <= 0) return node; // all points equal: keep as one leaf
    const mid = (start + end) >> 1;
    selectNth(coords, order, dim, axis, start, end - 1, mid);
    this.nodeAxis[node] = axis;
    this.nodeSplit[node] = coords[order[mid] * dim + axis];
    this.nodeLeft[node] = this.build(start, mid, leafSize);
    this.nodeRight[node] = this.build(mid, end, leafSize);
    return node;
  }

  /**
   * Writes the k nearest points to the point `query` (a row of `coords`) into `outIndex`/`outDistance`
   * (squared), nearest first, from offset `at`. With `skipIndex` ≥ 0 that point is left out.
   * Returns how many were found (min(k, count − skipped)).
   */
  nearest(
    query: ArrayLike<number>,
    queryOffset: number,
    k: number,
    outIndex: Int32Array,
    outDistance: Float64Array,
    at: number,
    skipIndex = -1,
    stack: Int32Array = new Int32Array(128),
  ): number {
    const { coords, order, dim } = this;
    // A max-heap of size ≤ k in outIndex/outDistance[at, at + k).
    let size = 0;
    let top = 0;
    stack[top++] = 0;
    // Invariant: the heap holds the k nearest among the points of the leaves visited so far.
    while (top > 0) {
      const node = stack[--top];
      const axis = this.nodeAxis[node];
      if (axis < 0) {
        for (let i = this.nodeStart[node]; i < this.nodeEnd[node]; i++) {
          const p = order[i];
          if (p === skipIndex) continue;
          let d = 0;
          const base = p * dim;
          for (let a = 0; a < dim; a++) {
            const t = coords[base + a] - query[queryOffset + a];
            d += t * t;
          }
          if (size < k) {
            heapPush(outIndex, outDistance, at, size, p, d);
            size++;
          } else if (d < outDistance[at]) {
            heapReplaceTop(outIndex, outDistance, at, size, p, d);
          }
        }
        continue;
      }
      const diff = query[queryOffset + axis] - this.nodeSplit[node];
      const near = diff < 0 ? this.nodeLeft[node] : this.nodeRight[node];
      const far = diff < 0 ? this.nodeRight[node] : this.nodeLeft[node];
      // Visit the far side only if the splitting plane is closer than the current k-th distance.
      if (size < k || diff * diff < outDistance[at]) {
        if (top + 2 > stack.length) {
          const bigger = new Int32Array(stack.length * 2);
          bigger.set(stack);
          stack = bigger;
        }
        stack[top++] = far;
      }
      stack[top++] = near;
    }
    heapSortAscending(outIndex, outDistance, at, size);
    return size;
  }
}

/**
 * The k nearest neighbours of every point of a cloud. With `includeSelf` (the default) each point is its own
 * first neighbour at distance 0, so k ≥ 1; without it, k ≤ count − 1.
 */
export function nearestNeighbours(
  coords: ArrayLike<number>,
  count: number,
  dim: number,
  k: number,
  options: NearestOptions = {},
): NeighbourTable {
  const includeSelf = options.includeSelf ?? true;
  checkK(k, count, includeSelf);
  if (dim > KD_TREE_MAX_DIMENSION) return nearestNeighboursByScan(coords, count, dim, k, { includeSelf });
  const tree = new KdTree(coords, count, dim, options.leafSize ?? 12);
  const indices = new Int32Array(count * k);
  const squaredDistances = new Float64Array(count * k);
  const stack = new Int32Array(256);
  for (let i = 0; i < count; i++) {
    tree.nearest(coords, i * dim, k, indices, squaredDistances, i * k, includeSelf ? -1 : i, stack);
  }
  return { count, k, indices, squaredDistances };
}

/** The same table by a direct scan of all pairs (n² work): the reference for tests and high dimension. */
export function nearestNeighboursByScan(
  coords: ArrayLike<number>,
  count: number,
  dim: number,
  k: number,
  options: NearestOptions = {},
): NeighbourTable {
  const includeSelf = options.includeSelf ?? true;
  checkK(k, count, includeSelf);
  const indices = new Int32Array(count * k);
  const squaredDistances = new Float64Array(count * k);
  for (let i = 0; i < count; i++) {
    let size = 0;
    const at = i * k;
    // Invariant: the heap holds the k nearest among points 0..j−1.
    for (let j = 0; j < count; j++) {
      if (!includeSelf && j === i) continue;
      let d = 0;
      for (let a = 0; a < dim; a++) {
        const t = coords[i * dim + a] - coords[j * dim + a];
        d += t * t;
      }
      if (size < k) heapPush(indices, squaredDistances, at, size++, j, d);
      else if (d < squaredDistances[at]) heapReplaceTop(indices, squaredDistances, at, size, j, d);
    }
    heapSortAscending(indices, squaredDistances, at, size);
  }
  return { count, k, indices, squaredDistances };
}

/**
 * The k nearest neighbours from a full `size × size` distance matrix (row-major). Squared distances are
 * returned, as for clouds.
 */
export function nearestNeighboursFromMatrix(
  matrix: ArrayLike<number>,
  size: number,
  k: number,
  options: NearestOptions = {},
): NeighbourTable {
  const includeSelf = options.includeSelf ?? true;
  checkK(k, size, includeSelf);
  const indices = new Int32Array(size * k);
  const squaredDistances = new Float64Array(size * k);
  for (let i = 0; i < size; i++) {
    let count = 0;
    const at = i * k;
    // Invariant: the heap holds the k nearest among columns 0..j−1 of row i.
    for (let j = 0; j < size; j++) {
      if (j === i && !includeSelf) continue;
      const d0 = j === i ? 0 : matrix[i * size + j];
      const d = d0 * d0;
      if (count < k) heapPush(indices, squaredDistances, at, count++, j, d);
      else if (d < squaredDistances[at]) heapReplaceTop(indices, squaredDistances, at, count, j, d);
    }
    heapSortAscending(indices, squaredDistances, at, count);
  }
  return { count: size, k, indices, squaredDistances };
}

function checkK(k: number, count: number, includeSelf: boolean): void {
  const most = includeSelf ? count : count - 1;
  if (!Number.isInteger(k) || k < 1 || k > most) {
    throw new RangeError(
      `k = ${k} neighbours asked of ${count} points (${includeSelf ? 'self included' : 'self excluded'}); need 1 ≤ k ≤ ${most}`,
    );
  }
}

// ---- a max-heap on (distance, index) kept in a slice of two typed arrays ----

function heapPush(idx: Int32Array, dist: Float64Array, at: number, size: number, p: number, d: number): void {
  let i = size;
  // Invariant: the slot i is free and every ancestor of i is ≥ its subtree apart from slot i.
  while (i > 0) {
    const parent = (i - 1) >> 1;
    if (dist[at + parent] >= d) break;
    dist[at + i] = dist[at + parent];
    idx[at + i] = idx[at + parent];
    i = parent;
  }
  dist[at + i] = d;
  idx[at + i] = p;
}

function heapReplaceTop(
  idx: Int32Array,
  dist: Float64Array,
  at: number,
  size: number,
  p: number,
  d: number,
): void {
  siftDown(idx, dist, at, size, 0, p, d);
}

function siftDown(
  idx: Int32Array,
  dist: Float64Array,
  at: number,
  size: number,
  start: number,
  p: number,
  d: number,
): void {
  let i = start;
  // Invariant: slot i is free; (p, d) belongs at i or below.
  for (;;) {
    const l = 2 * i + 1;
    if (l >= size) break;
    const r = l + 1;
    const c = r < size && dist[at + r] > dist[at + l] ? r : l;
    if (dist[at + c] <= d) break;
    dist[at + i] = dist[at + c];
    idx[at + i] = idx[at + c];
    i = c;
  }
  dist[at + i] = d;
  idx[at + i] = p;
}

/** Heap sort in place: turns the max-heap slice into ascending order. */
function heapSortAscending(idx: Int32Array, dist: Float64Array, at: number, size: number): void {
  // Invariant: [at, at + end) is a max-heap and [at + end, at + size) is sorted and ≥ the heap.
  for (let end = size - 1; end > 0; end--) {
    const d = dist[at + end];
    const p = idx[at + end];
    dist[at + end] = dist[at];
    idx[at + end] = idx[at];
    siftDown(idx, dist, at, end, 0, p, d);
  }
}

/** Quickselect on `order[lo..hi]` by coordinate `axis`, so that `order[nth]` is in its sorted place. */
function selectNth(
  coords: ArrayLike<number>,
  order: Int32Array,
  dim: number,
  axis: number,
  lo: number,
  hi: number,
  nth: number,
): void {
  // Invariant: the element of rank nth lies in order[lo..hi].
  while (hi > lo) {
    const pivot = coords[order[(lo + hi) >> 1] * dim + axis];
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (coords[order[i] * dim + axis] < pivot) i++;
      while (coords[order[j] * dim + axis] > pivot) j--;
      if (i <= j) {
        const t = order[i];
        order[i] = order[j];
        order[j] = t;
        i++;
        j--;
      }
    }
    if (nth <= j) hi = j;
    else if (nth >= i) lo = i;
    else return;
  }
}
