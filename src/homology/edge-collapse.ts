/**
 * Edge collapse of a Vietoris–Rips (flag) filtration: a smaller flag filtration with the same persistence
 * diagrams in every degree.
 *
 * Domination (Boissonnat & Pritam, "Edge collapse and persistence of flag complexes", 2020): in a graph G,
 * an edge uv is dominated by a vertex w ∉ {u, v} when N[u] ∩ N[v] ⊆ N[w] (closed neighbourhoods); then the
 * flag complex of G collapses onto that of G − uv, so the inclusion of the second in the first is a homotopy
 * equivalence.
 *
 * Shifting (after Glisse & Pritam, "Swap, shift and trim to edge collapse a filtration", 2022): if the edge
 * e (value s) is dominated in the graph G(t) of every value t in [s, T), then moving e to value T leaves the
 * persistence module unchanged up to isomorphism — at each such t the inclusion of G(t) − e into G(t)
 * induces an isomorphism, and these isomorphisms commute with the filtration's maps. If e stays dominated up
 * to the end of the filtration it is removed. Edges are handled from the last one back, each against the
 * current state of the others (the earlier ones at their own values, the later ones already moved), so every
 * step is one such shift and the diagrams of the result equal those of the input. Missing a dominator only
 * keeps an edge that could have moved, so every shortcut below errs that way.
 *
 * For one edge uv at value s: find a dominating w among the common neighbours at s; w keeps dominating until
 * the first value a_x > s at which a new common neighbour x arrives that w is not yet joined to; move on to
 * that value and look again. The edge's new value is the first one at which no vertex dominates it.
 *
 * Neighbourhoods are bitsets of 32-bit words. `waiting` holds the edges not handled yet: handled from the
 * last back, these are exactly the edges at or before the current one, all present at every value looked at.
 * The handled edges kept are also listed per vertex, sorted by their new rank; merging the lists of u and v
 * gives the later common neighbours in order of arrival, so the walk stops at the edge's new value instead of
 * reading every later neighbour (400 points near the sphere: five passes 0.42 s from 0.77 s, the same edges).
 */
import { type NeighbourLists, NO_EDGE, setEdge, tableEdges } from './neighbour-lists.js';

/** Collapse passes at most (see collapseFiltration). */
const MAX_PASSES = 5;

/**
 * Collapses the filtration whose dense rank table is `rankOf` and whose edges (in filtration order, ranks
 * `ranks`) are `lists`, in passes: after the first, earlier edges have moved, and the next pass finds more to
 * move. Passes stop when one moves fewer than a twentieth of the edges, or after MAX_PASSES.
 *
 * Moved edges share the rank they moved to with the edge whose arrival they waited for, so large groups of
 * edges end up tied. The result is then refined to one rank per edge, its position in filtration order
 * (ties by decreasing condensed index, as in tableEdges): a refinement of a filtration has the same diagrams
 * once ranks are read back as values, and without the ties far fewer simplices share a rank — on 400 points
 * near the sphere the degree-2 reduction had 14,905 columns instead of 20,584 and pushed 1.7 million cofacets
 * instead of 2.5 million (about 10% less time in all).
 * `rankOf` ends with the refined ranks; the returned lists and ranks describe the collapsed filtration, and
 * `levelOf[k]` is the rank, in the input's terms, of the edge of refined rank k.
 */
export function collapseFiltration(
  n: number,
  rankOf: Int32Array,
  lists: NeighbourLists,
  ranks: Int32Array,
): { lists: NeighbourLists; ranks: Int32Array; levelOf: Int32Array } {
  let current = { lists, ranks };
  for (let pass = 0; pass < MAX_PASSES; pass++) {
    const { kept, moved } = collapseEdges(n, rankOf, current.lists, current.ranks);
    current = tableEdges(n, rankOf);
    if (moved * 20 < kept) break;
  }
  const positions = renumberEdges(n, rankOf, current.lists);
  // Rows were filled in filtration order, so they stay sorted by the refined ranks.
  rowRanks(n, rankOf, current.lists);
  return { lists: current.lists, ranks: positions, levelOf: current.ranks };
}

/** Gives the k-th edge (in filtration order) rank k in the table; returns the new ranks, 0 … m − 1. */
function renumberEdges(n: number, rankOf: Int32Array, lists: NeighbourLists): Int32Array {
  const { low, high } = lists;
  const positions = new Int32Array(low.length);
  for (let k = 0; k < low.length; k++) {
    positions[k] = k;
    rankOf[low[k] * n + high[k]] = k;
    rankOf[high[k] * n + low[k]] = k;
  }
  return positions;
}

/** Copies every row entry's rank from the table. */
function rowRanks(n: number, rankOf: Int32Array, lists: NeighbourLists): void {
  const { start, vertex, rank } = lists;
  for (let z = 0; z < n; z++) {
    const row = z * n;
    for (let p = start[z]; p < start[z + 1]; p++) rank[p] = rankOf[row + vertex[p]];
  }
}

/**
 * One collapse pass, in place: `rankOf` (dense n × n, symmetric, NO_EDGE where there is no edge) ends with
 * each edge at its new rank (never lower than before) or NO_EDGE when removed. `lists` and `rank` describe
 * the filtration before the pass (edges in filtration order and their ranks) and are not changed. Returns
 * how many edges were kept and how many moved.
 */
export function collapseEdges(
  n: number,
  rankOf: Int32Array,
  lists: NeighbourLists,
  rank: Int32Array,
): CollapseCount {
  const { low, high, start } = lists;
  const words = (n + 31) >>> 5;
  const waiting = adjacencyBits(n, words, low, high);
  // The handled edges kept, per vertex, by decreasing current rank: row z is laterRank/laterVertex from
  // start[z], count[z] long (a vertex's handled edges are at most its edges, the row's room). Read from its
  // end, a row goes by increasing rank. Decreasing, because edges are handled from the last back and their new
  // ranks mostly fall below the row's: an insert then moves a few entries, not most of the row (on 400 points
  // near the sphere 8.9 million moves in five passes instead of 71 million).
  const count = new Int32Array(n);
  const laterRank = new Int32Array(start[n]);
  const laterVertex = new Int32Array(start[n]);
  const common = new Uint32Array(words);
  const candidates = new Uint32Array(words);
  const rows: Rows = { n, words, rankOf, waiting };
  let kept = 0;
  let moved = 0;
  for (let k = low.length - 1; k >= 0; k--) {
    const u = low[k];
    const v = high[k];
    const r = rank[k];
    const rowU = u * n;
    const rowV = v * n;
    const baseU = u * words;
    const baseV = v * words;
    // Common neighbours at r: joined to u and v by waiting edges, or by handled ones of rank r (ties; a
    // handled edge comes later in the filtration, so its rank is r or more, and rank-r ones end each row).
    const firstU = start[u];
    const firstV = start[v];
    let pu = firstU + count[u] - 1;
    let pv = firstV + count[v] - 1;
    for (let q = 0; q < words; q++) common[q] = waiting[baseU + q] & waiting[baseV + q];
    while (pu >= firstU && laterRank[pu] <= r) {
      const x = laterVertex[pu--];
      if (rankOf[rowV + x] <= r) common[x >>> 5] |= 1 << (x & 31);
    }
    while (pv >= firstV && laterRank[pv] <= r) {
      const x = laterVertex[pv--];
      if (rankOf[rowU + x] <= r) common[x >>> 5] |= 1 << (x & 31);
    }
    let s = r;
    let w = dominator(rows, s, common, candidates);
    if (w >= 0) {
      // Later common neighbours in order of arrival (the later of their edges to u and v), by merging the
      // rows of u and v: x listed at u at rank a arrives then if it is joined to v by a; listed at v, if it
      // is joined to u before a (a tie is taken at u). w dominates until the first arrival it is not
      // joined to by then; there a new dominator is sought, with every neighbour arrived by then.
      // invariant: the edge is dominated at every value in [r, s), by w at s; `common` is the set at s plus
      // the arrivals taken since, each joined to w by its arrival
      s = NO_EDGE;
      let rowW = w * n;
      while (pu >= firstU || pv >= firstV) {
        let x: number;
        let a: number;
        if (pv < firstV || (pu >= firstU && laterRank[pu] <= laterRank[pv])) {
          x = laterVertex[pu];
          a = laterRank[pu--];
          if (rankOf[rowV + x] > a) continue;
        } else {
          x = laterVertex[pv];
          a = laterRank[pv--];
          if (rankOf[rowU + x] >= a) continue;
        }
        common[x >>> 5] |= 1 << (x & 31);
        if (rankOf[rowW + x] <= a) continue;
        // w stops dominating at a: take every other arrival at a, then look for a dominator there.
        while (pu >= firstU && laterRank[pu] === a) {
          const y = laterVertex[pu--];
          if (rankOf[rowV + y] <= a) common[y >>> 5] |= 1 << (y & 31);
        }
        while (pv >= firstV && laterRank[pv] === a) {
          const y = laterVertex[pv--];
          if (rankOf[rowU + y] < a) common[y >>> 5] |= 1 << (y & 31);
        }
        w = dominator(rows, a, common, candidates);
        if (w < 0) {
          s = a;
          break;
        }
        rowW = w * n;
      }
    }
    if (s !== r) moved++;
    rankOf[rowU + v] = s;
    rankOf[rowV + u] = s;
    if (s !== NO_EDGE) {
      kept++;
      insertSorted(laterRank, laterVertex, start[u], count[u]++, s, v);
      insertSorted(laterRank, laterVertex, start[v], count[v]++, s, u);
    }
    clearEdge(waiting, words, u, v);
  }
  return { kept, moved };
}

/** The graph of the edges low[k]–high[k] as adjacency bitsets of `words` words per vertex. */
function adjacencyBits(n: number, words: number, low: Int32Array, high: Int32Array): Uint32Array {
  const bits = new Uint32Array(n * words);
  for (let k = 0; k < low.length; k++) setEdge(bits, words, low[k], high[k]);
  return bits;
}

/**
 * Inserts (rank, vertex) into the row of `length` entries from `from`, sorted by decreasing rank, before the
 * entries of equal rank (so that, read from the end, it comes after them).
 */
function insertSorted(
  ranks: Int32Array,
  vertices: Int32Array,
  from: number,
  length: number,
  rank: number,
  vertex: number,
): void {
  const end = from + length;
  let lo = from;
  let hi = end;
  // invariant: ranks before lo are > rank, from hi on ≤ rank
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (ranks[mid] > rank) lo = mid + 1;
    else hi = mid;
  }
  if (lo < end) {
    ranks.copyWithin(lo + 1, lo, end);
    vertices.copyWithin(lo + 1, lo, end);
  }
  ranks[lo] = rank;
  vertices[lo] = vertex;
}

/** What a collapse pass did: edges kept (at their old rank or a later one) and edges moved or removed. */
export interface CollapseCount {
  kept: number;
  moved: number;
}

/** What the searches below read: the rank table and the waiting edges as bitsets. */
interface Rows {
  n: number;
  words: number;
  rankOf: Int32Array;
  waiting: Uint32Array;
}

function clearEdge(bits: Uint32Array, words: number, p: number, q: number): void {
  bits[p * words + (q >>> 5)] &= ~(1 << (q & 31));
  bits[q * words + (p >>> 5)] &= ~(1 << (p & 31));
}

/**
 * A member of `common` joined by rank ≤ s to every other member, or −1 when none is found. A candidate c is
 * tried against the members; the first member x it misses rules out, with c, every candidate not joined to
 * x. The candidates are cut to x's neighbours by waiting edges alone — a bitset AND; a dominator joined to x
 * only by a handled edge is missed, which keeps the edge where it is (the shortcut measured 4× faster, and
 * the next pass catches most of what it missed).
 */
function dominator(rows: Rows, s: number, common: Uint32Array, candidates: Uint32Array): number {
  const { words, waiting } = rows;
  candidates.set(common);
  let q = words - 1;
  // invariant: every dominator is in `candidates`; words above q are empty
  while (q >= 0) {
    const bits = candidates[q];
    if (bits === 0) {
      q--;
      continue;
    }
    const c = (q << 5) + 31 - Math.clz32(bits);
    const x = firstMiss(rows, c, common, s);
    if (x < 0) return c;
    candidates[q] &= ~(1 << (c & 31));
    const base = x * words;
    const keepX = candidates[x >>> 5] & (1 << (x & 31));
    for (let p = 0; p <= q; p++) candidates[p] &= waiting[base + p];
    candidates[x >>> 5] |= keepX;
  }
  return -1;
}

/** The first member of `common` other than w that w is not joined to by rank ≤ s, or −1. */
function firstMiss(rows: Rows, w: number, common: Uint32Array, s: number): number {
  const { n, words, rankOf, waiting } = rows;
  const base = w * words;
  const row = w * n;
  const own = w >>> 5;
  const ownBit = 1 << (w & 31);
  // Members not joined to w by a waiting edge, looked up in the rank table.
  for (let q = 0; q < words; q++) {
    let miss = common[q] & ~waiting[base + q];
    if (q === own) miss &= ~ownBit;
    while (miss !== 0) {
      const lowest = miss & -miss;
      miss ^= lowest;
      const x = (q << 5) + 31 - Math.clz32(lowest);
      if (rankOf[row + x] > s) return x;
    }
  }
  return -1;
}
