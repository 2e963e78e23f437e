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
  const kept = orderedEdges.length;
  const low = new Int32Array(kept);
  const high = new Int32Array(kept);
  for (let k = 0; k < kept; k++) {
    const e = orderedEdges[k];
    const j = edgeHighVertex(e);
    low[k] = e - (j * (j - 1)) / 2;
    high[k] = j;
  }
  return listsOf(n, low, high, ranks);
}

/** The lists of the edges low[k] < high[k] (in filtration order) of ranks `ranks`. */
function listsOf(n: number, low: Int32Array, high: Int32Array, ranks: Int32Array): NeighbourLists {
  const kept = low.length;
  const start = new Int32Array(n + 1);
  for (let k = 0; k < kept; k++) {
    // invariant: start[v + 1] counts the edges at v among the first k
    start[low[k] + 1]++;
    start[high[k] + 1]++;
  }
  for (let v = 0; v < n; v++) start[v + 1] += start[v];
  const fill = start.slice(0, n);
  const vertex = new Int32Array(2 * kept);
  const rank = new Int32Array(2 * kept);
  for (let k = 0; k < kept; k++) {
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
  return { start, vertex, rank, low, high };
}

/**
 * The edges of a dense rank table (n × n, NO_EDGE where there is none) in filtration order — rank ascending,
 * ties by decreasing condensed index — by a counting sort over the ranks, as lists with the ranks in order.
 */
export function tableEdges(n: number, rankOf: Int32Array): { lists: NeighbourLists; ranks: Int32Array } {
  let count = 0;
  let top = 0;
  for (let j = 1; j < n; j++) {
    const row = j * n;
    for (let i = 0; i < j; i++) {
      const r = rankOf[row + i];
      if (r === NO_EDGE) continue;
      count++;
      if (r > top) top = r;
    }
  }
  const next = new Int32Array(top + 2);
  for (let j = 1; j < n; j++) {
    const row = j * n;
    for (let i = 0; i < j; i++) if (rankOf[row + i] !== NO_EDGE) next[rankOf[row + i] + 1]++;
  }
  for (let r = 0; r <= top; r++) next[r + 1] += next[r];
  const low = new Int32Array(count);
  const high = new Int32Array(count);
  const ranks = new Int32Array(count);
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
  return { lists: listsOf(n, low, high, ranks), ranks };
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
