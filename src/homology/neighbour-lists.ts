import { edgeHighVertex } from './simplex-index.js';

/** The rank of a missing edge in a dense rank table (and of the diagonal). */
export const NO_EDGE = 0x7fffffff;

/**
 * The edges of a filtration in order, and every vertex's neighbours in filtration order of the joining edge,
 * as compressed rows: row v is vertex[start[v] … start[v+1]) with the edge ranks in `rank`. Filled in one pass
 * over the ordered edges, so each row comes out sorted by rank without sorting. Memory: 24 bytes per edge.
 */
export interface NeighbourLists {
  start: Int32Array;
  vertex: Int32Array;
  rank: Int32Array;
  /** The endpoints low[k] < high[k] of the k-th edge in filtration order. */
  low: Int32Array;
  high: Int32Array;
}

/** The lists of the edges `orderedEdges` (condensed indices, in filtration order) of ranks `ranks`. */
export function neighbourLists(n: number, orderedEdges: Int32Array, ranks: Int32Array): NeighbourLists {
  const low = new Int32Array(orderedEdges.length);
  const high = new Int32Array(orderedEdges.length);
  endpoints(orderedEdges, low, high);
  return listsOf(n, low, high, ranks);
}

/** The endpoints low[k] < high[k] of the condensed edge indices edges[k]. */
function endpoints(edges: Int32Array, low: Int32Array, high: Int32Array): void {
  for (let k = 0; k < edges.length; k++) {
    const e = edges[k];
    const j = edgeHighVertex(e);
    low[k] = e - (j * (j - 1)) / 2;
    high[k] = j;
  }
}

/**
 * The lists of the edges low[k] < high[k] (in filtration order) of ranks `ranks`. Each loop is a function of
 * its own with nothing after it: a thread's engine compiles a loop that runs long on its first call while
 * the rest of the function has never run, and such code, reused on every later call, was thrown away again
 * at the first statement after the loop — 77 times in 100 clouds of 300 points (`--trace-deopt`).
 */
function listsOf(n: number, low: Int32Array, high: Int32Array, ranks: Int32Array): NeighbourLists {
  const start = new Int32Array(n + 1);
  countDegrees(low, high, start);
  prefixSums(start);
  const vertex = new Int32Array(2 * low.length);
  const rank = new Int32Array(2 * low.length);
  fillRows(low, high, ranks, start.slice(0, n), vertex, rank);
  return { start, vertex, rank, low, high };
}

/** start[v + 1] += the number of edges at v. */
function countDegrees(low: Int32Array, high: Int32Array, start: Int32Array): void {
  for (let k = 0; k < low.length; k++) {
    // invariant: start[v + 1] counts the edges at v among the first k
    start[low[k] + 1]++;
    start[high[k] + 1]++;
  }
}

/** Running sums, in place. */
function prefixSums(start: Int32Array): void {
  for (let v = 1; v < start.length; v++) start[v] += start[v - 1];
}

/** Each row in filtration order: row v is filled from fill[v] on. */
function fillRows(
  low: Int32Array,
  high: Int32Array,
  ranks: Int32Array,
  fill: Int32Array,
  vertex: Int32Array,
  rank: Int32Array,
): void {
  for (let k = 0; k < low.length; k++) {
    // invariant: each row holds, in filtration order, the neighbours joined by the first k edges
    const i = low[k];
    const j = high[k];
    const r = ranks[k];
    let p = fill[i]++;
    vertex[p] = j;
    rank[p] = r;
    p = fill[j]++;
    vertex[p] = i;
    rank[p] = r;
  }
}

/**
 * The edges of a dense rank table (n × n, NO_EDGE where there is none) in filtration order — rank ascending,
 * ties by decreasing condensed index — by a counting sort over the ranks, as lists with the ranks in order.
 */
export function tableEdges(n: number, rankOf: Int32Array): { lists: NeighbourLists; ranks: Int32Array } {
  const top = highestRank(n, rankOf);
  const next = new Int32Array(top + 2);
  const count = rankCounts(n, rankOf, next);
  prefixSums(next);
  const low = new Int32Array(count);
  const high = new Int32Array(count);
  const ranks = new Int32Array(count);
  placeEdges(n, rankOf, next, low, high, ranks);
  return { lists: listsOf(n, low, high, ranks), ranks };
}

/** The highest rank in the table's lower triangle (0 when there is no edge). */
function highestRank(n: number, rankOf: Int32Array): number {
  let top = 0;
  for (let j = 1; j < n; j++) {
    const row = j * n;
    for (let i = 0; i < j; i++) {
      const r = rankOf[row + i];
      if (r !== NO_EDGE && r > top) top = r;
    }
  }
  return top;
}

/** next[r + 1] += the number of edges of rank r; returns the number of edges. */
function rankCounts(n: number, rankOf: Int32Array, next: Int32Array): number {
  let count = 0;
  for (let j = 1; j < n; j++) {
    const row = j * n;
    for (let i = 0; i < j; i++) {
      const r = rankOf[row + i];
      if (r === NO_EDGE) continue;
      next[r + 1]++;
      count++;
    }
  }
  return count;
}

/** The edges in filtration order (each rank's from next[rank] on, by decreasing condensed index). */
function placeEdges(
  n: number,
  rankOf: Int32Array,
  next: Int32Array,
  low: Int32Array,
  high: Int32Array,
  ranks: Int32Array,
): void {
  // invariant: the edges of greater condensed index than (i, j) are placed, each rank's by decreasing index
  for (let j = n - 1; j >= 1; j--) {
    const row = j * n;
    for (let i = j - 1; i >= 0; i--) {
      const r = rankOf[row + i];
      if (r === NO_EDGE) continue;
      const p = next[r]++;
      low[p] = i;
      high[p] = j;
      ranks[p] = r;
    }
  }
}

/** The first position p in [from, to) with ranks[p] ≥ r (ranks ascending there, as in a row), or `to`. */
export function firstAtLeast(ranks: Int32Array, from: number, to: number, r: number): number {
  let lo = from;
  let hi = to;
  // invariant: ranks before lo are < r, from hi on ≥ r
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (ranks[mid] < r) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Adds the edge pq to adjacency bitsets: row v is `words` 32-bit words from v · words, bit x for neighbour x. */
export function setEdge(bits: Uint32Array, words: number, p: number, q: number): void {
  bits[p * words + (q >>> 5)] |= 1 << (q & 31);
  bits[q * words + (p >>> 5)] |= 1 << (p & 31);
}
