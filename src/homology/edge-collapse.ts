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
 * The handled edges present at s are added from the neighbour lists, which are sorted by original rank.
 */
import { firstAtLeast, type NeighbourLists, NO_EDGE, setEdge, tableEdges } from './neighbour-lists.js';

/** Collapse passes at most (see collapseFiltration). */
const MAX_PASSES = 5;

/**
 * Collapses the filtration whose dense rank table is `rankOf` and whose edges (in filtration order, ranks
 * `ranks`) are `lists`, in passes: after the first, earlier edges have moved, and the next pass finds more to
 * move. Passes stop when one moves fewer than a twentieth of the edges, or after MAX_PASSES. `rankOf` ends
 * with the collapsed ranks; the returned lists and ranks describe the collapsed filtration.
 */
export function collapseFiltration(
  n: number,
  rankOf: Int32Array,
  lists: NeighbourLists,
  ranks: Int32Array,
): { lists: NeighbourLists; ranks: Int32Array } {
  let current = { lists, ranks };
  for (let pass = 0; pass < MAX_PASSES; pass++) {
    const { kept, moved } = collapseEdges(n, rankOf, current.lists, current.ranks);
    current = tableEdges(n, rankOf);
    if (moved * 20 < kept) break;
  }
  return current;
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
  const { low, high, start, vertex } = lists;
  const neighbourRank = lists.rank;
  const words = (n + 31) >>> 5;
  const waiting = new Uint32Array(n * words);
  for (let k = 0; k < low.length; k++) setEdge(waiting, words, low[k], high[k]);
  // Edges not removed (waiting, or handled and kept): where common neighbours can still arrive from.
  const present = waiting.slice();
  const common = new Uint32Array(words);
  const nearU = new Uint32Array(words);
  const nearV = new Uint32Array(words);
  const candidates = new Uint32Array(words);
  const laterVertex = new Int32Array(n);
  const laterArrival = new Int32Array(n);
  const rows: Rows = { n, words, start, vertex, neighbourRank, rankOf, waiting };
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
    const fromU = firstAtLeast(neighbourRank, start[u], start[u + 1], r);
    const fromV = firstAtLeast(neighbourRank, start[v], start[v + 1], r);
    // Common neighbours at r: joined to u and v by waiting edges, or by handled ones of rank ≤ r (ties).
    const handledU = neighboursAt(rows, u, fromU, r, nearU);
    const handledV = neighboursAt(rows, v, fromV, r, nearV);
    for (let q = 0; q < words; q++) common[q] = waiting[baseU + q] & waiting[baseV + q];
    if (handledU || handledV) {
      if (!handledU) nearU.fill(0);
      if (!handledV) nearV.fill(0);
      for (let q = 0; q < words; q++)
        common[q] = (waiting[baseU + q] | nearU[q]) & (waiting[baseV + q] | nearV[q]);
    }
    let s = r;
    let w = dominator(rows, s, common, candidates);
    if (w >= 0) {
      // The later common neighbours and their arrivals (the later of their edges to u and v): joined to both
      // by edges still present, not common yet. From here on `common` grows by arrivals alone.
      let later = 0;
      for (let q = 0; q < words; q++) {
        let bits = present[baseU + q] & present[baseV + q] & ~common[q];
        while (bits !== 0) {
          const lowest = bits & -bits;
          bits ^= lowest;
          const x = (q << 5) + 31 - Math.clz32(lowest);
          const ru = rankOf[rowU + x];
          const rv = rankOf[rowV + x];
          laterVertex[later] = x;
          laterArrival[later++] = ru > rv ? ru : rv;
        }
      }
      // invariant: the edge is dominated at every value in [r, s), by w at s; `common` is the set at s and
      // laterVertex/laterArrival[0 … later) the neighbours still to arrive
      while (true) {
        // w dominates until the first arrival it is not joined to by then.
        const rowW = w * n;
        let next = NO_EDGE;
        for (let i = 0; i < later; i++) {
          const arrival = laterArrival[i];
          if (arrival < next && rankOf[rowW + laterVertex[i]] > arrival) next = arrival;
        }
        s = next;
        if (next === NO_EDGE) break;
        let still = 0;
        for (let i = 0; i < later; i++) {
          const x = laterVertex[i];
          if (laterArrival[i] <= next) common[x >>> 5] |= 1 << (x & 31);
          else {
            laterVertex[still] = x;
            laterArrival[still++] = laterArrival[i];
          }
        }
        later = still;
        w = dominator(rows, s, common, candidates);
        if (w < 0) break;
      }
    }
    if (s !== r) moved++;
    rankOf[rowU + v] = s;
    rankOf[rowV + u] = s;
    if (s === NO_EDGE) clearEdge(present, words, u, v);
    else kept++;
    clearEdge(waiting, words, u, v);
  }
  return { kept, moved };
}

/** What a collapse pass did: edges kept (at their old rank or a later one) and edges moved or removed. */
export interface CollapseCount {
  kept: number;
  moved: number;
}

/** What the searches below read: the rank table, the neighbour lists and the waiting edges as bitsets. */
interface Rows {
  n: number;
  words: number;
  start: Int32Array;
  vertex: Int32Array;
  neighbourRank: Int32Array;
  rankOf: Int32Array;
  waiting: Uint32Array;
}

function clearEdge(bits: Uint32Array, words: number, p: number, q: number): void {
  bits[p * words + (q >>> 5)] &= ~(1 << (q & 31));
  bits[q * words + (p >>> 5)] &= ~(1 << (p & 31));
}

/**
 * Writes into `out` the neighbours of z joined by an already handled edge of current rank ≤ s, and says
 * whether there are any. Handled edges come after the current one (rank r) in the filtration, so they sit in
 * z's row from listed rank r on (position `from`); a listed rank is never above the current one, so the walk
 * stops at listed rank s.
 */
function neighboursAt(rows: Rows, z: number, from: number, s: number, out: Uint32Array): boolean {
  const { n, words, start, vertex, neighbourRank, rankOf, waiting } = rows;
  const row = z * n;
  const base = z * words;
  const to = start[z + 1];
  let any = false;
  for (let p = from; p < to && neighbourRank[p] <= s; p++) {
    const x = vertex[p];
    const bit = 1 << (x & 31);
    if ((waiting[base + (x >>> 5)] & bit) !== 0 || rankOf[row + x] > s) continue;
    if (!any) {
      out.fill(0);
      any = true;
    }
    out[x >>> 5] |= bit;
  }
  return any;
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
