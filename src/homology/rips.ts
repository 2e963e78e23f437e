import { checkMemory, fitsMemory, formatBytes, memoryBudget } from '../core/budgets.js';
import type { Diagram } from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import { collapseFiltration } from './edge-collapse.js';
import { type Metric, pairwiseDistances } from './metric.js';
import { firstAtLeast, type NeighbourLists, NO_EDGE, neighbourLists, setEdge } from './neighbour-lists.js';
import { CofacetHeap, keepOdd, PivotMap } from './pivot-map.js';
import { RankQueue } from './rank-queue.js';
import { kernelCloudRips, kernelFits, kernelRips } from './rips-kernel.js';
import { BinomialTable, binomial, condensedLength, edgeHighVertex, maxVertexCount } from './simplex-index.js';
import { UnionFind } from './union-find.js';

/**
 * Vietoris–Rips persistence in degrees 0–2 over Z/2.
 *
 * - H0: union-find over the edges in filtration order (elder rule).
 * - H1, H2: persistent cohomology (de Silva, Morozov, Vejdemo-Johansson, "Dualities in persistent
 *   (co)homology", 2011) with clearing (Chen & Kerber, "Persistent homology computation with a twist",
 *   2011): columns are the d-simplices in reverse filtration order, a column's pivot is its earliest
 *   cofacet, and simplices already paired as pivots in degree d − 1 are skipped.
 * - Emergent pairs: when a column's earliest cofacet has the same value as the column and no earlier column
 *   owns it, the pair is taken without reduction (no heap is built).
 * - Simplices are numbers in the combinatorial number system (simplex-index.ts); cofacets are enumerated on
 *   the fly from a dense table of edge ranks, so no boundary or coboundary matrix is ever stored.
 * - Filtration values are replaced by ranks (the position of a value among the distinct edge values), so
 *   comparisons are on integers and ties are exact. Filtration order: by rank, then by dimension, then by
 *   decreasing index.
 * - Without `maxScale`, the complex is cut at the enclosing radius min_i max_j d(i, j): there the complex is
 *   a cone over the centre vertex, so no class of degree ≥ 1 survives beyond it.
 * - For degree 2 (or on request) dominated edges are collapsed first (edge-collapse.ts): a smaller flag
 *   filtration with the same diagrams. Degree-2 cofacets come from neighbour rows sorted by rank, a cursor
 *   per added triangle, so a column that sweeps far (a long-lived void) pushes nothing beyond its pivot.
 */
export interface RipsOptions {
  /** Highest homology degree computed. */
  maxDegree: 0 | 1 | 2;
  /** Largest filtration value kept (default: none, i.e. the enclosing radius). Classes alive at the cut get death Infinity. */
  maxScale?: number;
  /** Filtration value of each vertex (default 0); a simplex's value is the max of its edges' and vertices' values. */
  vertexValues?: Float64Array;
  /**
   * Collapse dominated edges before the reduction of degrees ≥ 1 (edge-collapse.ts); the diagrams are the
   * same either way. Default: when degree 2 is computed, where it shrinks the work by orders of magnitude.
   */
  collapse?: boolean;
  /**
   * Run on the WebAssembly engine (rips-kernel.ts; the same diagrams, pair for pair and in the same order):
   * degrees 0–1 without the collapse, degree 2 with it. False runs the TypeScript engine; clouds too large for
   * the kernel run there anyway. Default true.
   */
  kernel?: boolean;
  /** Refuse when the estimated working memory exceeds this many bytes (default: 80 % of free memory, at least 1 GiB). */
  memoryLimit?: number;
}

export function ripsPersistence(n: number, edgeValues: Float64Array, options: RipsOptions): Diagram[] {
  const maxDegree = options.maxDegree;
  if (!(maxDegree === 0 || maxDegree === 1 || maxDegree === 2))
    throw new RangeError(`maxDegree must be 0, 1 or 2, got ${maxDegree}`);
  const edgeCount = condensedLength(n);
  if (edgeValues.length !== edgeCount) {
    throw new RangeError(`edgeValues has ${edgeValues.length} entries; ${n} vertices need ${edgeCount}`);
  }
  const vertexValues = options.vertexValues;
  if (vertexValues !== undefined && vertexValues.length !== n) {
    throw new RangeError(`vertexValues has ${vertexValues.length} entries; expected ${n}`);
  }
  if (maxDegree >= 1 && n > maxVertexCount(maxDegree + 2)) {
    throw new UserError(
      `${n} points are too many for degree ${maxDegree}: simplex numbers would exceed 2^53; subsample the cloud`,
    );
  }

  if (maxDegree >= 2 && binomial(n, 3) >= 2 ** 32) {
    throw new UserError(
      `${n} points are too many for degree 2 (over 2^32 triangles); subsample the cloud or compute degrees 0,1`,
    );
  }

  if (lowDegreesOnKernel(n, options)) {
    const diagrams = kernelRips(
      n,
      edgeValues,
      maxDegree as 0 | 1,
      options.maxScale ?? Infinity,
      vertexValues,
    );
    // undefined: an edge value is invalid, which the checks below word.
    if (diagrams !== undefined) return diagrams;
  }

  // Effective edge values: max of the edge and its two vertices.
  const values = vertexValues === undefined ? edgeValues : raisedByVertices(n, edgeValues, vertexValues);
  const bad = firstInvalidEdge(values);
  if (bad >= 0) {
    const j = edgeHighVertex(bad);
    const i = bad - (j * (j - 1)) / 2;
    throw new UserError(
      `the distance between points ${i + 1} and ${j + 1} is ${values[bad]}; distances must be numbers ≥ 0`,
    );
  }

  let threshold = options.maxScale ?? Infinity;
  if (n >= 2) threshold = Math.min(threshold, enclosingRadius(n, values));

  checkSize(n, values, threshold, maxDegree, options.memoryLimit);
  if (maxDegree === 2 && options.collapse !== false && options.kernel !== false && kernelFits(n, 2)) {
    // Degree 2 on the kernel too, with the collapse (it always collapses); checked above like the rest.
    const diagrams = kernelRips(n, edgeValues, 2, options.maxScale ?? Infinity, vertexValues);
    if (diagrams !== undefined) return diagrams;
  }

  // Edges inside the threshold in filtration order (value ascending, ties by decreasing index), by a
  // stable radix sort; `levels` are the distinct values and an edge's rank indexes them.
  const { order: orderedEdges, sorted: sortedValues } = sortEdges(values, threshold);
  const kept = orderedEdges.length;
  const rankCond = new Int32Array(edgeCount).fill(NO_EDGE);
  const rankSorted = new Int32Array(kept);
  const levelCount = rankEdges(sortedValues, orderedEdges, rankSorted, rankCond);
  const levels = sortedValues.slice(0, levelCount);
  const rankOf = denseRanks(n, rankCond);

  const births0: number[] = [];
  const deaths0: number[] = [];
  // The endpoints of the ordered edges (and, for degree ≥ 1, every vertex's neighbours in rank order).
  const neighbours = maxDegree >= 1 ? neighbourLists(n, orderedEdges, rankSorted) : undefined;
  // H0 by union-find; edges that close a cycle become the degree-1 columns.
  const uf = new UnionFind(n);
  let cycles: CycleEdges = {
    low: new Int32Array(kept),
    high: new Int32Array(kept),
    rank: new Int32Array(kept),
    count: 0,
  };
  cycles.count = componentPairs(
    uf,
    orderedEdges,
    neighbours,
    rankSorted,
    levels,
    vertexValues,
    births0,
    deaths0,
    cycles,
  );
  essentialComponents(uf, n, vertexValues, threshold, births0, deaths0);
  const diagrams: Diagram[] = [
    { degree: 0, births: Float64Array.from(births0), deaths: Float64Array.from(deaths0) },
  ];
  if (maxDegree === 0) return diagrams;

  let lists = neighbours as NeighbourLists;
  let edgeRanks: Int32Array = rankSorted;
  let reductionLevels: Float64Array = levels;
  if (options.collapse ?? maxDegree >= 2) {
    const collapsed = collapseFiltration(n, rankOf, lists, rankSorted);
    lists = collapsed.lists;
    edgeRanks = collapsed.ranks;
    reductionLevels = valuesOf(levels, collapsed.levelOf);
    cycles = cycleEdges(n, lists.low, lists.high, edgeRanks);
  }

  const table = new BinomialTable(n, 4);
  // Triangles paired in degree 1 are cleared from degree 2: a bitset over all triangle numbers.
  const cleared = maxDegree >= 2 ? new Uint8Array(Math.ceil(binomial(n, 3) / 8)) : undefined;
  const engine = new Reduction(n, rankOf, reductionLevels, table, cleared, lists);
  diagrams.push(engine.reduceEdges(cycles.low, cycles.high, cycles.rank, cycles.count));
  if (maxDegree === 1) return diagrams;
  diagrams.push(engine.reduceTriangles(lists.low, lists.high, edgeRanks));
  return diagrams;
}

/**
 * ripsPersistence of a point cloud (row-major finite coordinates) under `metric`. On the WebAssembly engine
 * (when ripsPersistence would use it) the distances are computed there too, as the same doubles.
 */
export function cloudRipsPersistence(
  coords: Float64Array,
  n: number,
  dim: number,
  metric: Metric,
  options: RipsOptions,
): Diagram[] {
  if (options.vertexValues === undefined && lowDegreesOnKernel(n, options)) {
    const diagrams = kernelCloudRips(
      coords,
      n,
      dim,
      metric,
      options.maxDegree as 0 | 1,
      options.maxScale ?? Infinity,
    );
    if (diagrams !== undefined) return diagrams;
  }
  checkRipsFloor(n, { memoryLimit: options.memoryLimit });
  return ripsPersistence(n, pairwiseDistances(coords, n, dim, metric), options);
}

/*
 * The loops of ripsPersistence and sortEdges are functions of their own with nothing after the loop: a
 * thread's engine compiles a loop that runs long on the first call while the code after it has never run,
 * and that code, reused on later calls, was thrown away again at the first statement after the loop, call
 * after call (`--trace-deopt` over 100 clouds of 300 points; each throw-away also meant compiling again).
 */

/** The edge values raised to the larger of their two vertices' values. */
function raisedByVertices(n: number, edgeValues: Float64Array, vertexValues: Float64Array): Float64Array {
  const values = new Float64Array(edgeValues.length);
  for (let j = 1, e = 0; j < n; j++) {
    // invariant: e = condensed index of (i, j)
    for (let i = 0; i < j; i++, e++) {
      const v = edgeValues[e];
      values[e] = Math.max(v, vertexValues[i], vertexValues[j]);
    }
  }
  return values;
}

/** The first edge whose value is NaN or negative, or −1. */
function firstInvalidEdge(values: Float64Array): number {
  for (let e = 0; e < values.length; e++) if (!(values[e] >= 0)) return e;
  return -1;
}

/**
 * Ranks the sorted edges by distinct value: writes each edge's rank (in order, and by condensed index),
 * moves the distinct values to the front of `sortedValues` and returns how many there are.
 */
function rankEdges(
  sortedValues: Float64Array,
  orderedEdges: Int32Array,
  rankSorted: Int32Array,
  rankCond: Int32Array,
): number {
  let levelCount = 0;
  for (let k = 0; k < orderedEdges.length; k++) {
    const v = sortedValues[k];
    // invariant: sortedValues[0..levelCount) holds the distinct values among the first k, in order
    if (levelCount === 0 || sortedValues[levelCount - 1] !== v) sortedValues[levelCount++] = v;
    rankSorted[k] = levelCount - 1;
    rankCond[orderedEdges[k]] = levelCount - 1;
  }
  return levelCount;
}

/** levels[levelOf[k]] for every k: the values of refined ranks. */
function valuesOf(levels: Float64Array, levelOf: Int32Array): Float64Array {
  const values = new Float64Array(levelOf.length);
  for (let k = 0; k < levelOf.length; k++) values[k] = levels[levelOf[k]];
  return values;
}

/**
 * H0 over the ordered edges (elder rule): the finite pairs go to births/deaths, the edges closing a cycle to
 * `cycles`; returns their count. Endpoints come from the neighbour lists when there are any.
 */
function componentPairs(
  uf: UnionFind,
  orderedEdges: Int32Array,
  neighbours: NeighbourLists | undefined,
  rankSorted: Int32Array,
  levels: Float64Array,
  vertexValues: Float64Array | undefined,
  births: number[],
  deaths: number[],
  cycles: CycleEdges,
): number {
  const lowEnd = neighbours?.low;
  const highEnd = neighbours?.high;
  const { low, high, rank } = cycles;
  let count = 0;
  for (let k = 0; k < orderedEdges.length; k++) {
    let i: number;
    let j: number;
    if (lowEnd !== undefined && highEnd !== undefined) {
      i = lowEnd[k];
      j = highEnd[k];
    } else {
      const e = orderedEdges[k];
      j = edgeHighVertex(e);
      i = e - (j * (j - 1)) / 2;
    }
    const ri = uf.find(i);
    const rj = uf.find(j);
    if (ri === rj) {
      low[count] = i;
      high[count] = j;
      rank[count] = rankSorted[k];
      count++;
      continue;
    }
    const oi = uf.oldest[ri];
    const oj = uf.oldest[rj];
    const bi = vertexValues === undefined ? 0 : vertexValues[oi];
    const bj = vertexValues === undefined ? 0 : vertexValues[oj];
    const iOlder = bi < bj || (bi === bj && oi < oj);
    const death = levels[rankSorted[k]];
    const birth = iOlder ? bj : bi;
    if (death > birth) {
      births.push(birth);
      deaths.push(death);
    }
    uf.link(ri, rj, iOlder ? oi : oj);
  }
  return count;
}

/** The components never merged: one essential H0 class each, born at its oldest vertex (if inside the threshold). */
function essentialComponents(
  uf: UnionFind,
  n: number,
  vertexValues: Float64Array | undefined,
  threshold: number,
  births: number[],
  deaths: number[],
): void {
  for (let v = 0; v < n; v++) {
    if (uf.find(v) !== v) continue;
    const o = uf.oldest[v];
    const b = vertexValues === undefined ? 0 : vertexValues[o];
    if (b > threshold) continue;
    births.push(b);
    deaths.push(Infinity);
  }
}

interface CycleEdges {
  low: Int32Array;
  high: Int32Array;
  rank: Int32Array;
  count: number;
}

/** The edges (in filtration order) that close a cycle when added: the degree-1 columns. */
function cycleEdges(n: number, low: Int32Array, high: Int32Array, ranks: Int32Array): CycleEdges {
  const uf = new UnionFind(n);
  const m = low.length;
  const cl = new Int32Array(m);
  const ch = new Int32Array(m);
  const cr = new Int32Array(m);
  let count = 0;
  for (let k = 0; k < m; k++) {
    // invariant: cl/ch/cr[0 … count) are the cycle-closing edges among the first k
    const ri = uf.find(low[k]);
    const rj = uf.find(high[k]);
    if (ri === rj) {
      cl[count] = low[k];
      ch[count] = high[k];
      cr[count++] = ranks[k];
    } else uf.link(ri, rj, ri);
  }
  return { low: cl, high: ch, rank: cr, count };
}

/**
 * The edges with value ≤ threshold, sorted by value ascending and ties by decreasing condensed index, with
 * their values in that order. Non-negative doubles order like their bit patterns: a stable least-significant-
 * digit radix sort on the high 32 bits (two 16-bit passes, skipped when a digit is constant), fed in
 * decreasing index order, then an insertion pass orders the short runs that share their high bits.
 */
export function sortEdges(
  values: Float64Array,
  threshold: number,
): { order: Int32Array; sorted: Float64Array } {
  const kept = countAtMost(values, threshold);
  let order = new Int32Array(kept);
  let vals = new Float64Array(kept);
  keptInReverse(values, threshold, order, vals);
  const little = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;
  const hiWord = little ? 1 : 0;
  let order2 = new Int32Array(kept);
  let vals2 = new Float64Array(kept);
  const counts = new Int32Array(65536);
  // Passes as [word, shift]: the high word only, unless long runs share it (then all four, low word first).
  let passes: Array<[number, number]> = [
    [hiWord, 0],
    [hiWord, 16],
  ];
  for (let round = 0; round < 2; round++) {
    for (const [word, shift] of passes) {
      const words = new Uint32Array(vals.buffer);
      digitCounts(words, word, shift, counts);
      if (kept === 0 || counts[(words[word] >>> shift) & 0xffff] === kept) continue;
      exclusiveSums(counts);
      scatter(words, word, shift, counts, order, vals, order2, vals2);
      const o = order;
      order = order2;
      order2 = o;
      const v = vals;
      vals = vals2;
      vals2 = v;
    }
    if (round === 1 || longestRun(vals) <= 32) break;
    passes = [
      [1 - hiWord, 0],
      [1 - hiWord, 16],
      [hiWord, 0],
      [hiWord, 16],
    ];
  }
  // Entries now agree in order on their high 32 bits; finish by value with a stable insertion pass.
  insertionPass(vals, order);
  return { order, sorted: vals };
}

function countAtMost(values: Float64Array, threshold: number): number {
  let kept = 0;
  for (let e = 0; e < values.length; e++) if (values[e] <= threshold) kept++;
  return kept;
}

/** The edges of value ≤ threshold in decreasing index order, with their values (−0 as 0). */
function keptInReverse(values: Float64Array, threshold: number, order: Int32Array, vals: Float64Array): void {
  for (let e = values.length - 1, k = 0; e >= 0; e--) {
    const v = values[e];
    if (!(v <= threshold)) continue;
    order[k] = e;
    vals[k++] = v === 0 ? 0 : v; // −0 sorts as 0
  }
}

/** counts[d] = how many of the doubles (as 32-bit words) have the 16-bit digit d at (word, shift). */
function digitCounts(words: Uint32Array, word: number, shift: number, counts: Int32Array): void {
  counts.fill(0);
  for (let k = word; k < words.length; k += 2) counts[(words[k] >>> shift) & 0xffff]++;
}

/** Counts to starting positions, in place. */
function exclusiveSums(counts: Int32Array): void {
  let acc = 0;
  for (let d = 0; d < counts.length; d++) {
    const c = counts[d];
    counts[d] = acc;
    acc += c;
  }
}

/** One stable pass: every entry to its digit's next position. */
function scatter(
  words: Uint32Array,
  word: number,
  shift: number,
  counts: Int32Array,
  order: Int32Array,
  vals: Float64Array,
  order2: Int32Array,
  vals2: Float64Array,
): void {
  // invariant: entries before k are placed, stably, by the digit of this pass
  for (let k = 0; k < order.length; k++) {
    const p = counts[(words[2 * k + word] >>> shift) & 0xffff]++;
    order2[p] = order[k];
    vals2[p] = vals[k];
  }
}

/** Stable insertion sort by value of entries already nearly in order, with their edges. */
function insertionPass(vals: Float64Array, order: Int32Array): void {
  for (let k = 1; k < vals.length; k++) {
    const v = vals[k];
    if (vals[k - 1] <= v) continue;
    const e = order[k];
    let q = k - 1;
    // invariant: vals[q+1..k] are greater than v and shifted right by one
    while (q >= 0 && vals[q] > v) {
      vals[q + 1] = vals[q];
      order[q + 1] = order[q];
      q--;
    }
    vals[q + 1] = v;
    order[q + 1] = e;
  }
}

/** The longest run of entries sharing their high 32 bits in a sorted-by-high-bits array. */
function longestRun(vals: Float64Array): number {
  const words = new Uint32Array(vals.buffer, vals.byteOffset, vals.length * 2);
  const hiWord = new Uint8Array(new Uint16Array([1]).buffer)[0] === 1 ? 1 : 0;
  let best = vals.length > 0 ? 1 : 0;
  let run = 1;
  for (let k = 1; k < vals.length; k++) {
    run = words[2 * k + hiWord] === words[2 * k - 2 + hiWord] ? run + 1 : 1;
    if (run > best) best = run;
  }
  return best;
}

/** The dense symmetric n × n table of edge ranks from the condensed ranks (diagonal NO_EDGE), in cache-sized blocks. */
function denseRanks(n: number, rankCond: Int32Array): Int32Array {
  const table = new Int32Array(n * n);
  for (let v = 0; v < n; v++) table[v * n + v] = NO_EDGE;
  const B = 64;
  for (let jb = 1; jb < n; jb += B) {
    const jEnd = Math.min(n, jb + B);
    for (let ib = 0; ib < jEnd - 1; ib += B) {
      const iEnd = Math.min(ib + B, jEnd - 1);
      // invariant: entries (i, j) and (j, i) of earlier blocks are written
      for (let j = jb; j < jEnd; j++) {
        const base = (j * (j - 1)) / 2;
        const top = Math.min(iEnd, j);
        for (let i = ib; i < top; i++) {
          const r = rankCond[base + i];
          table[j * n + i] = r;
          table[i * n + j] = r;
        }
      }
    }
  }
  return table;
}

/** min over vertices i of max over j of the edge value (i, j): above it the complex is a cone. */
export function enclosingRadius(n: number, values: Float64Array): number {
  const far = new Float64Array(n);
  farthest(n, values, far);
  return smallest(far);
}

/** far[v] = the largest value of the edges at v. */
function farthest(n: number, values: Float64Array, far: Float64Array): void {
  for (let j = 1, e = 0; j < n; j++) {
    // invariant: far[v] is the largest value seen among edges at v so far
    for (let i = 0; i < j; i++, e++) {
      const v = values[e];
      if (v > far[i]) far[i] = v;
      if (v > far[j]) far[j] = v;
    }
  }
}

/** The smallest entry (Infinity when empty). */
function smallest(xs: Float64Array): number {
  let r = Infinity;
  for (let i = 0; i < xs.length; i++) if (xs[i] < r) r = xs[i];
  return r;
}

/** Estimated bytes of working memory for the computation (see size-estimate in the module docs). */
export function estimateRipsBytes(
  n: number,
  values: Float64Array,
  threshold: number,
  maxDegree: number,
): { bytes: number; edges: number; triangles: number } {
  const edgeCount = condensedLength(n);
  let kept = 0;
  for (let e = 0; e < edgeCount; e++) if (values[e] <= threshold) kept++;
  // Edges: sorted copy, ordered list, cycle list, degree-1 columns, pivot map, neighbour lists with their
  // endpoints (≈ 8+4+4+8+24+24 bytes each),
  // plus the dense rank table (4 n² bytes).
  let bytes = 4 * n * n + 72 * kept;
  let triangles = 0;
  if (maxDegree >= 2 && n >= 3) {
    // The fraction of triangles inside the threshold, from a fixed deterministic sample of triples.
    const trials = 4096;
    let inside = 0;
    let state = 0x2545f491;
    const draw = (m: number): number => {
      state = (Math.imul(state, 1664525) + 1013904223) >>> 0;
      return state % m;
    };
    for (let t = 0; t < trials; t++) {
      const a = draw(n);
      let b = draw(n - 1);
      if (b >= a) b++;
      let c = draw(n);
      while (c === a || c === b) c = draw(n);
      const hi1 = Math.max(a, b);
      const lo1 = Math.min(a, b);
      const ab = (hi1 * (hi1 - 1)) / 2 + lo1;
      const hi2 = Math.max(a, c);
      const lo2 = Math.min(a, c);
      const ac = (hi2 * (hi2 - 1)) / 2 + lo2;
      const hi3 = Math.max(b, c);
      const lo3 = Math.min(b, c);
      const bc = (hi3 * (hi3 - 1)) / 2 + lo3;
      if (values[ab] <= threshold && values[ac] <= threshold && values[bc] <= threshold) inside++;
    }
    triangles = (binomial(n, 3) * inside) / trials;
    // Triangles: the column list (8 bytes) and a fraction of them in the degree-2 pivot map (24 bytes).
    bytes += 8 * triangles + 6 * triangles + binomial(n, 3) / 8;
  }
  return { bytes, edges: kept, triangles };
}

/** Whether degrees 0–1 go to the WebAssembly engine (see RipsOptions.kernel; degree 2 is decided later). */
function lowDegreesOnKernel(n: number, options: RipsOptions): boolean {
  return (
    options.maxDegree <= 1 &&
    options.collapse !== true &&
    options.kernel !== false &&
    kernelFits(n) &&
    cheapBoundFits(n, options.maxDegree, options.memoryLimit)
  );
}

/** Whether every edge kept fits the budget without degree 2 (the cheap bound of checkSize). */
function cheapBoundFits(n: number, maxDegree: number, limit?: number): boolean {
  if (maxDegree >= 2) return false;
  return fitsMemory(4 * n * n + 72 * condensedLength(n), limit);
}

/**
 * Bytes any Rips computation on n vertices holds whatever its scale: the condensed edge values (8 bytes a
 * pair; 8 more for the values raised by vertex values), the rank of every pair (4) and the dense rank table
 * (4n²). Known from n alone, so it is checked before the distances are computed.
 */
export function ripsFloorBytes(n: number, withVertexValues = false): number {
  const pairs = condensedLength(n);
  return (withVertexValues ? 20 : 12) * pairs + 4 * n * n;
}

/**
 * Refuses, before anything is allocated, a Rips computation on n vertices whose scale-independent memory
 * (ripsFloorBytes) exceeds the budget (src/core/budgets.ts). `what` names the filtration in the message.
 */
export function checkRipsFloor(
  n: number,
  options: { withVertexValues?: boolean; memoryLimit?: number; what?: string; sample?: string } = {},
): void {
  checkMemory(
    ripsFloorBytes(n, options.withVertexValues === true),
    `${options.sample === undefined ? '' : `sample '${options.sample}': `}the ${options.what ?? 'Rips'} filtration of ${n} points (${condensedLength(n)} pairwise distances)`,
    'subsample the cloud (--subsample maxmin:N or random:N) or split it',
    options.memoryLimit,
  );
}

function checkSize(
  n: number,
  values: Float64Array,
  threshold: number,
  maxDegree: number,
  limit?: number,
): void {
  // Without degree 2, every edge kept is a cheap upper bound; count exactly only when it does not fit.
  if (cheapBoundFits(n, maxDegree, limit)) return;
  const budget = memoryBudget(limit);
  const { bytes, edges, triangles } = estimateRipsBytes(n, values, threshold, maxDegree);
  if (bytes > budget) {
    const mb = formatBytes;
    const what =
      maxDegree >= 2 ? `${edges} edges and about ${Math.round(triangles)} triangles` : `${edges} edges`;
    throw new UserError(
      `the Rips complex of ${n} points up to scale ${threshold} has ${what}, needing about ${mb(bytes)} ` +
        `(limit ${mb(budget)}); lower --max-scale, compute fewer degrees or subsample the cloud`,
    );
  }
}

/**
 * The reduction of degree-1 and degree-2 coboundary columns (cohomology, clearing), with apparent pairs
 * (Bauer & Roll, "Gromov hyperbolicity, geodesic defect, and apparent pairs in Vietoris–Rips filtrations", 2022): a d-simplex σ and a
 * cofacet τ of the same rank form an apparent pair when τ is σ's oldest cofacet and σ is τ's youngest facet
 * of that rank. Such pairs are persistence pairs of zero length: their columns are skipped and they are
 * never stored; when a reduction meets τ as a pivot, σ is found again by local arithmetic.
 *
 * Orders used throughout: a simplex's oldest cofacet has the smallest rank, ties to the largest number
 * (found by scanning the added vertex downwards); its youngest facet of a given rank is the one with the
 * smallest number.
 */
class Reduction {
  private readonly heap = new CofacetHeap(4096);
  /** Stored reduction columns (the simplices whose coboundaries sum to a reduced column), flattened. */
  private store = new Float64Array(1 << 16);
  private storeLength = 0;
  private starts = new Int32Array(1 << 12);
  private columnCount = 0;
  private scratch = new Float64Array(256);
  private scratchLength = 0;
  private readonly vertices = new Int32Array(4);
  /** First bound step of the working column, in ranks (see CofacetHeap). */
  private readonly step: number;
  private readonly c2: Float64Array;
  private readonly c3: Float64Array;
  private readonly c4: Float64Array;
  /** The added vertex of the cofacet found by the last oldest-cofacet scan. */
  private found = -1;
  /** The facet of the apparent pair found by apparentEdge or apparentTriangle (a double from the start, as in RankQueue). */
  private facet = 0.5;
  /**
   * The working column holds only the cofacets of rank ≤ cap of the simplices added so far (the scratch
   * column); when it runs dry, cap rises and the cofacets in the new rank range are pushed for every added
   * simplex — in degree 1 by enumerating them again, the step doubling each time; in degree 2 from each
   * triangle's cursors, a fixed step at a time. Most columns find their pivot long before the top ranks, so
   * most cofacets are never pushed at all.
   */
  private cap = 0;
  private capStep = 1;
  private readonly topRank: number;
  /**
   * Degree 2: every vertex's neighbours in the whole filtration as a bitset of `words` 32-bit words, so that
   * a triangle's cofacets are the bits common to its three vertices.
   */
  private readonly words: number;
  private readonly adjacency: Uint32Array | undefined;
  /** Cofacets at or before (floorRank, floorIndex) in filtration order are not pushed (−1: none). */
  private floorRank = -1;
  private floorIndex = 0.5; // a double from the start, as simplex numbers outgrow small integers
  /** The degree-2 working column. */
  private readonly queue: RankQueue | undefined;
  /**
   * Degree 2, beside each triangle of the scratch column: its vertices a > b > c, its rank, and its cursors,
   * the positions in the neighbour rows of a, b and c up to which its cofacets have been pushed.
   */
  private triangleA = new Int32Array(256);
  private triangleB = new Int32Array(256);
  private triangleC = new Int32Array(256);
  private triangleRank = new Int32Array(256);
  private cursorA = new Int32Array(256);
  private cursorB = new Int32Array(256);
  private cursorC = new Int32Array(256);

  constructor(
    private readonly n: number,
    private readonly rankOf: Int32Array,
    private readonly levels: Float64Array,
    private readonly table: BinomialTable,
    private readonly cleared: Uint8Array | undefined,
    private readonly neighbours: NeighbourLists,
  ) {
    this.step = Math.max(1, Math.ceil(levels.length / 64));
    this.topRank = levels.length - 1;
    this.c2 = table.row(2);
    this.c3 = table.row(3);
    this.c4 = table.row(4);
    this.words = (n + 31) >>> 5;
    if (cleared !== undefined) {
      const adjacency = new Uint32Array(n * this.words);
      for (let k = 0; k < neighbours.low.length; k++)
        setEdge(adjacency, this.words, neighbours.low[k], neighbours.high[k]);
      this.adjacency = adjacency;
      this.queue = new RankQueue(levels.length);
    }
  }

  // ---------------------------------------------------------------- degree 1: edges and triangles

  /** The oldest cofacet of the edge (i < j) of rank r, as a triangle number, or −1; sets `found`. */
  private oldestOfEdge(i: number, j: number, r: number): number {
    const { n, rankOf, c2, c3 } = this;
    const rowI = i * n;
    const rowJ = j * n;
    // invariant: no cofacet {i, j, k'} with k' > k has rank r
    for (let k = n - 1; k >= 0; k--) {
      if (rankOf[rowI + k] > r || rankOf[rowJ + k] > r) continue; // also skips k = i, j
      this.found = k;
      return k > j ? c3[k] + c2[j] + i : k > i ? c3[j] + c2[k] + i : c3[j] + c2[i] + k;
    }
    return -1;
  }

  /** Whether (i < j) is the youngest rank-r facet of the rank-r triangle {i, j, k}. */
  private youngestEdge(i: number, j: number, k: number, r: number): boolean {
    const { n, rankOf, c2 } = this;
    const e = c2[j] + i;
    if (rankOf[i * n + k] === r && (k > i ? c2[k] + i : c2[i] + k) < e) return false;
    if (rankOf[j * n + k] === r && (k > j ? c2[k] + j : c2[j] + k) < e) return false;
    return true;
  }

  /**
   * Whether the triangle a > b > c (number t, rank r) is in an apparent pair; its edge goes to `facet` (see
   * apparentTriangle).
   */
  private apparentEdge(a: number, b: number, c: number, r: number, t: number): boolean {
    const { n, rankOf, c2 } = this;
    // Facets by increasing number: (c, b), (c, a), (b, a); the first of rank r is the youngest.
    let lo: number;
    let hi: number;
    if (rankOf[c * n + b] === r) {
      lo = c;
      hi = b;
    } else if (rankOf[c * n + a] === r) {
      lo = c;
      hi = a;
    } else {
      lo = b;
      hi = a;
    }
    if (this.oldestOfEdge(lo, hi, r) !== t) return false;
    this.facet = c2[hi] + lo;
    return true;
  }

  private markCleared(t: number): void {
    const cleared = this.cleared;
    if (cleared !== undefined) cleared[t >>> 3] |= 1 << (t & 7);
  }

  /**
   * Degree-1 columns: the cycle edges (lowEnds[c] < highEnds[c], rank columnRanks[c]) listed in filtration
   * order, processed from the last one back (reverse filtration order).
   */
  reduceEdges(lowEnds: Int32Array, highEnds: Int32Array, columnRanks: Int32Array, count: number): Diagram {
    const { levels, heap, c2 } = this;
    const vertices = this.vertices;
    const births: number[] = [];
    const deaths: number[] = [];
    this.resetStore();
    const pivots = new PivotMap(Math.max(16, count >> 3));
    let previousRank = -1;
    for (let col = count - 1; col >= 0; col--) {
      const i = lowEnds[col];
      const j = highEnds[col];
      const r = columnRanks[col];
      const e = c2[j] + i;
      // Only columns of rank r own pivots of rank r; the first column of a rank meets no owned one.
      const tied = r === previousRank;
      previousRank = r;
      const t = this.oldestOfEdge(i, j, r);
      if (t >= 0) {
        const k = this.found;
        if (this.youngestEdge(i, j, k, r)) {
          this.markCleared(t); // apparent pair: zero length, nothing stored
          continue;
        }
        sort3(i, j, k, vertices);
        if (!(tied && pivots.has(t)) && !this.apparentEdge(vertices[0], vertices[1], vertices[2], r, t)) {
          pivots.set(t, this.storeColumn1(e)); // emergent pair
          this.markCleared(t);
          continue;
        }
      }
      heap.clear();
      this.scratchLength = 0;
      this.capStep = this.step;
      this.cap = Math.min(this.topRank, r + this.capStep);
      this.addEdgeCofacets(i, j, r, -1, this.cap);
      this.pushScratch(e);
      while (true) {
        if (!this.nextPivot()) {
          births.push(levels[r]);
          deaths.push(Infinity);
          break;
        }
        const pr = heap.pivotRank;
        const pi = heap.pivotIndex;
        const owner = pivots.get(pi);
        if (owner >= 0) {
          heap.push(pr, pi);
          for (let s = this.starts[owner]; s < this.starts[owner + 1]; s++) this.addEdge(this.store[s]);
          continue;
        }
        this.table.vertices(pi, 3, vertices);
        if (this.apparentEdge(vertices[0], vertices[1], vertices[2], pr, pi)) {
          heap.push(pr, pi);
          this.addEdge(this.facet);
          continue;
        }
        const death = levels[pr];
        if (death > levels[r]) {
          births.push(levels[r]);
          deaths.push(death);
        }
        pivots.set(pi, this.storeScratch());
        this.markCleared(pi);
        break;
      }
    }
    return { degree: 1, births: Float64Array.from(births), deaths: Float64Array.from(deaths) };
  }

  /** Adds the coboundary of the edge numbered f to the working column and f to its reduction column. */
  private addEdge(f: number): void {
    const fj = edgeHighVertex(f);
    const fi = f - this.c2[fj];
    this.addEdgeCofacets(fi, fj, this.rankOf[fi * this.n + fj], -1, this.cap);
    this.pushScratch(f);
  }

  /**
   * The next pivot of the degree-1 working column (heap.pivotRank, heap.pivotIndex), raising cap as needed;
   * false when the column is zero.
   */
  private nextPivot(): boolean {
    const heap = this.heap;
    // invariant: the heap holds the cofacets of rank ≤ cap of the scratch column, less cancelled pairs
    while (!heap.popPivot()) {
      if (this.cap >= this.topRank) return false;
      const lo = this.cap;
      this.capStep *= 2;
      this.cap = Math.min(this.topRank, lo + this.capStep);
      for (let s = 0; s < this.scratchLength; s++) {
        const f = this.scratch[s];
        const fj = edgeHighVertex(f);
        const fi = f - this.c2[fj];
        this.addEdgeCofacets(fi, fj, this.rankOf[fi * this.n + fj], lo, this.cap);
      }
    }
    return true;
  }

  /**
   * Pushes every cofacet {i, j, k} of the edge (i < j) of rank r whose rank lies in (lo, hi]. Only the
   * neighbours k of i joined by an edge of rank ≤ hi can qualify: i's row is walked in rank order up to hi.
   */
  private addEdgeCofacets(i: number, j: number, r: number, lo: number, hi: number): void {
    const { n, rankOf, heap, c2, c3 } = this;
    const { start, vertex, rank } = this.neighbours;
    const rowJ = j * n;
    const end = start[i + 1];
    // invariant: the cofacets {i, j, vertex[q]} for q < p with rank in (lo, hi] are in the working column
    for (let p = start[i]; p < end; p++) {
      const rki = rank[p];
      if (rki > hi) break;
      const k = vertex[p];
      const rkj = rankOf[rowJ + k];
      if (rkj === NO_EDGE) continue; // also k = j
      let rk = rki > rkj ? rki : rkj;
      if (r > rk) rk = r;
      if (rk <= lo || rk > hi) continue;
      heap.push(rk, k > j ? c3[k] + c2[j] + i : k > i ? c3[j] + c2[k] + i : c3[j] + c2[i] + k);
    }
  }

  // ---------------------------------------------------------------- degree 2: triangles and tetrahedra

  /**
   * The oldest cofacet of the triangle a > b > c of rank r, as a tetrahedron number, or −1; sets `found`.
   * Its fourth vertex is the largest common neighbour of a, b and c joined to each by rank ≤ r.
   */
  private oldestOfTriangle(a: number, b: number, c: number, r: number): number {
    const { n, rankOf, c2, c3, c4, words } = this;
    const adjacency = this.adjacency as Uint32Array;
    const rowA = a * n;
    const rowB = b * n;
    const rowC = c * n;
    const wa = a * words;
    const wb = b * words;
    const wc = c * words;
    // invariant: no cofacet with fourth vertex in a word above q has rank r
    for (let q = words - 1; q >= 0; q--) {
      let bits = adjacency[wa + q] & adjacency[wb + q] & adjacency[wc + q];
      while (bits !== 0) {
        const bit = 31 - Math.clz32(bits);
        bits ^= 1 << bit;
        const k = (q << 5) + bit;
        if (rankOf[rowA + k] > r || rankOf[rowB + k] > r || rankOf[rowC + k] > r) continue;
        this.found = k;
        return fourthVertexNumber(a, b, c, k, c2, c3, c4);
      }
    }
    return -1;
  }

  /**
   * Whether the tetrahedron w > x > y > z (number q, rank r) is in an apparent pair; its triangle goes to
   * `facet` (a number kept apart from the answer: a result that was a small integer or a large double
   * deoptimised the comparison that read it on every run).
   */
  private apparentTriangle(w: number, x: number, y: number, z: number, r: number, q: number): boolean {
    const { n, rankOf, c2, c3 } = this;
    const wx = rankOf[w * n + x];
    const wy = rankOf[w * n + y];
    const wz = rankOf[w * n + z];
    const xy = rankOf[x * n + y];
    const xz = rankOf[x * n + z];
    const yz = rankOf[y * n + z];
    // Facets by increasing number: xyz, wyz, wxz, wxy; the first of rank r is the youngest.
    let a: number;
    let b: number;
    let c: number;
    if (Math.max(xy, xz, yz) === r) {
      a = x;
      b = y;
      c = z;
    } else if (Math.max(wy, wz, yz) === r) {
      a = w;
      b = y;
      c = z;
    } else if (Math.max(wx, wz, xz) === r) {
      a = w;
      b = x;
      c = z;
    } else {
      a = w;
      b = x;
      c = y;
    }
    if (this.oldestOfTriangle(a, b, c, r) !== q) return false;
    this.facet = c3[a] + c2[b] + c;
    return true;
  }

  /**
   * The degree-2 columns: triangles inside the threshold that are neither cleared nor in an apparent pair,
   * in reverse filtration order (rank descending, ties by increasing number), with their ranks.
   *
   * Triangles are met through their last edge: the edges are taken in filtration order (low, high, ranks),
   * and the triangles whose last edge is pq are p, q and a vertex joined to both by an earlier edge — the
   * members of the bitset `before[p] & before[q]`, in increasing number. `upTo` holds every edge of rank at
   * most the current one, so the oldest cofacet of a triangle of rank r is the largest vertex joined to all
   * three by it.
   */
  private triangleColumns(
    low: Int32Array,
    high: Int32Array,
    ranks: Int32Array,
  ): { columns: Float64Array; columnRanks: Int32Array } {
    const { n, rankOf, c2, c3, words } = this;
    const cleared = this.cleared as Uint8Array;
    const before = new Uint32Array(n * words);
    const upTo = new Uint32Array(n * words);
    const pair = new Uint32Array(words);
    // Room for a column per edge to start with (14,905 columns for 48,873 edges on 400 points near the sphere).
    let found = new Float64Array(Math.max(1 << 12, low.length));
    let foundRanks = new Int32Array(found.length);
    let count = 0;
    let added = 0;
    const m = low.length;
    for (let e = 0; e < m; e++) {
      const p = low[e];
      const q = high[e];
      const r = ranks[e];
      // invariant: upTo holds the edges of rank ≤ r, before the edges preceding e in filtration order
      for (; added < m && ranks[added] <= r; added++) setEdge(upTo, words, low[added], high[added]);
      const groupStart = count;
      const wp = p * words;
      const wq = q * words;
      const rowP = p * n;
      const rowQ = q * n;
      for (let w = 0; w < words; w++) pair[w] = upTo[wp + w] & upTo[wq + w];
      for (let w = 0; w < words; w++) {
        let bits = before[wp + w] & before[wq + w];
        while (bits !== 0) {
          const lowest = bits & -bits;
          bits ^= lowest;
          const x = (w << 5) + 31 - Math.clz32(lowest);
          const t = x > q ? c3[x] + c2[q] + p : x > p ? c3[q] + c2[x] + p : c3[q] + c2[p] + x;
          // The oldest cofacet's fourth vertex: the largest vertex joined to p, q and x by rank ≤ r.
          let k = -1;
          const wx = x * words;
          for (let z = words - 1; z >= 0; z--) {
            const both = pair[z] & upTo[wx + z];
            if (both !== 0) {
              k = (z << 5) + 31 - Math.clz32(both);
              break;
            }
          }
          // Apparent when pqx is the youngest rank-r facet of pqxk: the facets numbered below pqx (which
          // leaves out k) leave out a vertex above k, and pqk (leaving out x) has rank r, so k > x is needed;
          // leaving out q gives pxk, out p gives qxk, of rank r only through a tie at r.
          if (
            k > x &&
            (k > q ||
              (rankOf[rowP + x] !== r &&
                rankOf[rowP + k] !== r &&
                rankOf[x * n + k] !== r &&
                (k > p || (rankOf[rowQ + x] !== r && rankOf[rowQ + k] !== r))))
          )
            continue;
          // Cleared (paired with an edge) — looked up only now: a triangle in an apparent pair is paired
          // with its cofacet, so never cleared, and most triangles are (a random read of a bitmap of one bit
          // per triangle saved, 30% of this loop on 400 points near the sphere).
          if (cleared[t >>> 3] & (1 << (t & 7))) continue;
          if (count === found.length) {
            const f2 = new Float64Array(found.length * 2);
            f2.set(found);
            found = f2;
            const r2 = new Int32Array(foundRanks.length * 2);
            r2.set(foundRanks);
            foundRanks = r2;
          }
          found[count] = t;
          foundRanks[count++] = r;
        }
      }
      // Triangles of equal rank but different last edges interleave by number: keep each rank's run sorted.
      if (groupStart > 0 && count > groupStart && foundRanks[groupStart - 1] === r) {
        let from = groupStart - 1;
        while (from > 0 && foundRanks[from - 1] === r) from--;
        found.subarray(from, count).sort();
      }
      setEdge(before, words, p, q);
    }
    const columns = new Float64Array(count);
    const columnRanks = new Int32Array(count);
    reverseRuns(found, foundRanks, columns, columnRanks);
    return { columns, columnRanks };
  }

  /** Degree 2: the columns of `triangleColumns`, reduced; the edges are those of the filtration, in order. */
  reduceTriangles(low: Int32Array, high: Int32Array, ranks: Int32Array): Diagram {
    const { levels } = this;
    const queue = this.queue as RankQueue;
    const vertices = this.vertices;
    const { columns, columnRanks } = this.triangleColumns(low, high, ranks);
    const columnCount = columns.length;
    const births: number[] = [];
    const deaths: number[] = [];
    this.resetStore();
    const pivots = new PivotMap(Math.max(16, columnCount));
    let previousRank = -1;
    for (let col = 0; col < columnCount; col++) {
      const t = columns[col];
      const r = columnRanks[col];
      this.table.vertices(t, 3, vertices);
      const a = vertices[0];
      const b = vertices[1];
      const c = vertices[2];
      const tied = r === previousRank;
      previousRank = r;
      const q = this.oldestOfTriangle(a, b, c, r);
      if (q >= 0) {
        sort4(a, b, c, this.found, vertices);
        if (
          !(tied && pivots.has(q)) &&
          !this.apparentTriangle(vertices[0], vertices[1], vertices[2], vertices[3], r, q)
        ) {
          pivots.set(q, this.storeColumn1(t)); // emergent pair
          continue;
        }
      }
      // The working column holds the cofacets of rank ≤ cap of the triangles added so far; each added
      // triangle keeps a cursor in the neighbour rows of its three vertices, so raising cap enumerates only
      // the cofacets in the new rank range. Columns that sweep far (a long-lived class) never push the
      // cofacets beyond their pivot.
      queue.clear(r);
      this.scratchLength = 0;
      this.cap = Math.min(this.topRank, r + this.step);
      this.floorRank = -1;
      this.insertTriangle(t, a, b, c, r);
      while (true) {
        if (!queue.popPivot()) {
          if (this.cap >= this.topRank) {
            births.push(levels[r]);
            deaths.push(Infinity);
            break;
          }
          this.cap = Math.min(this.topRank, this.cap + this.step);
          for (let s = 0; s < this.scratchLength; s++) this.advanceCursors(s, this.cap);
          continue;
        }
        const pr = queue.pivotRank;
        const pi = queue.pivotIndex;
        // What is added next cancels the pivot and sums to zero below it (the owner's reduced column starts
        // at the pivot; an apparent facet's cofacets start there): entries up to the pivot are left out.
        this.floorRank = pr;
        this.floorIndex = pi;
        const owner = pivots.get(pi);
        if (owner >= 0) {
          for (let s = this.starts[owner]; s < this.starts[owner + 1]; s++) this.addTriangle(this.store[s]);
          continue;
        }
        this.table.vertices(pi, 4, vertices);
        if (this.apparentTriangle(vertices[0], vertices[1], vertices[2], vertices[3], pr, pi)) {
          this.addTriangle(this.facet);
          continue;
        }
        const death = levels[pr];
        if (death > levels[r]) {
          births.push(levels[r]);
          deaths.push(death);
        }
        pivots.set(pi, this.storeScratch());
        break;
      }
    }
    return { degree: 2, births: Float64Array.from(births), deaths: Float64Array.from(deaths) };
  }

  /** Adds the coboundary of the triangle numbered f to the working column and f to its reduction column. */
  private addTriangle(f: number): void {
    const v = this.vertices;
    this.table.vertices(f, 3, v);
    const a = v[0];
    const b = v[1];
    const c = v[2];
    this.insertTriangle(f, a, b, c, triangleRank(this.rankOf, this.n, a, b, c));
  }

  /**
   * Adds the triangle t = {a > b > c} of rank r to the reduction column and pushes its cofacets of rank ≤ cap
   * that come after the floor (floorRank, floorIndex) in filtration order — all of them when floorRank is
   * −1. Cofacets of rank r (all three new edges of rank ≤ r) are found on the shortest of the three rows
   * cut at r; every later cofacet is met in the row of its last edge, where the triangle's cursors wait.
   */
  private insertTriangle(t: number, a: number, b: number, c: number, r: number): void {
    const { n, rankOf, c2, c3, c4, floorRank, floorIndex } = this;
    const queue = this.queue as RankQueue;
    const { start, vertex, rank } = this.neighbours;
    const s = this.scratchLength;
    this.pushScratch(t);
    const ta = this.triangleA;
    const tb = this.triangleB;
    const tc = this.triangleC;
    ta[s] = a;
    tb[s] = b;
    tc[s] = c;
    this.triangleRank[s] = r;
    const endA = firstAbove(rank, start[a], start[a + 1], r);
    const endB = firstAbove(rank, start[b], start[b + 1], r);
    const endC = firstAbove(rank, start[c], start[c + 1], r);
    if (r >= floorRank) {
      // The row with the fewest entries of rank ≤ r, checked against the other two.
      let x = a;
      let from = start[a];
      let to = endA;
      if (endB - start[b] < to - from) {
        x = b;
        from = start[b];
        to = endB;
      }
      if (endC - start[c] < to - from) {
        x = c;
        from = start[c];
        to = endC;
      }
      const y = x === a ? b : a;
      const z = x === c ? b : c;
      const rowY = y * n;
      const rowZ = z * n;
      // invariant: the rank-r cofacets with fourth vertex before position p in x's row are pushed
      for (let p = from; p < to; p++) {
        const k = vertex[p];
        if (rankOf[rowY + k] > r || rankOf[rowZ + k] > r) continue; // also k = y, z
        const index = fourthVertexNumber(a, b, c, k, c2, c3, c4);
        if (r === floorRank && index >= floorIndex) continue;
        queue.push(r, index);
      }
    }
    // Later cofacets below the floor sum to zero: the cursors start at the floor's rank.
    const least = floorRank > r ? floorRank : r + 1;
    this.cursorA[s] = least > r + 1 ? firstAtLeast(rank, endA, start[a + 1], least) : endA;
    this.cursorB[s] = least > r + 1 ? firstAtLeast(rank, endB, start[b + 1], least) : endB;
    this.cursorC[s] = least > r + 1 ? firstAtLeast(rank, endC, start[c + 1], least) : endC;
    this.advanceCursors(s, this.cap);
  }

  /**
   * Pushes the cofacets of the s-th added triangle whose last edge (the one of largest rank, ties to the row
   * of the larger vertex) has rank in (cursor, hi], moving its cursors to hi. The floor applies to the
   * equal-rank entries met at insertion, which are the only ones that can reach it.
   */
  private advanceCursors(s: number, hi: number): void {
    const n = this.n;
    const a = this.triangleA[s];
    const b = this.triangleB[s];
    const c = this.triangleC[s];
    // A cofacet's last edge is in the row of the larger vertex on a tie: a's row takes ties with both, b's
    // with c only, c's with none.
    this.cursorA[s] = this.pushRow(a, this.cursorA[s], hi, b * n, 0, c * n, 0, a, b, c);
    this.cursorB[s] = this.pushRow(b, this.cursorB[s], hi, a * n, 1, c * n, 0, a, b, c);
    this.cursorC[s] = this.pushRow(c, this.cursorC[s], hi, a * n, 1, b * n, 1, a, b, c);
  }

  /**
   * Pushes the cofacets of triangle abc met in x's row from position p up to rank hi whose last edge is there:
   * the fourth vertex k is joined to the other two (rows rowY, rowZ) by rank ≤ its edge to x, or < when the
   * tie goes to the other row (tieY, tieZ = 1). Returns the position reached.
   */
  private pushRow(
    x: number,
    p: number,
    hi: number,
    rowY: number,
    tieY: number,
    rowZ: number,
    tieZ: number,
    a: number,
    b: number,
    c: number,
  ): number {
    const { rankOf, c2, c3, c4, floorRank, floorIndex } = this;
    const queue = this.queue as RankQueue;
    const { start, vertex, rank } = this.neighbours;
    // invariant: the cofacets whose last edge is in x's row before p are pushed
    for (const end = start[x + 1]; p < end && rank[p] <= hi; p++) {
      const k = vertex[p];
      const rk = rank[p];
      if (rankOf[rowY + k] > rk - tieY || rankOf[rowZ + k] > rk - tieZ) continue;
      const index = fourthVertexNumber(a, b, c, k, c2, c3, c4);
      if (rk === floorRank && index >= floorIndex) continue;
      queue.push(rk, index);
    }
    return p;
  }

  // ---------------------------------------------------------------- stored reduction columns

  private resetStore(): void {
    this.storeLength = 0;
    this.columnCount = 0;
    this.starts[0] = 0;
  }

  private pushScratch(x: number): void {
    if (this.scratchLength === this.scratch.length) {
      const s = new Float64Array(this.scratch.length * 2);
      s.set(this.scratch);
      this.scratch = s;
      if (this.adjacency !== undefined) {
        this.triangleA = grown(this.triangleA, s.length);
        this.triangleB = grown(this.triangleB, s.length);
        this.triangleC = grown(this.triangleC, s.length);
        this.triangleRank = grown(this.triangleRank, s.length);
        this.cursorA = grown(this.cursorA, s.length);
        this.cursorB = grown(this.cursorB, s.length);
        this.cursorC = grown(this.cursorC, s.length);
      }
    }
    this.scratch[this.scratchLength++] = x;
  }

  /** Stores the one-simplex column [x]; returns its column number. */
  private storeColumn1(x: number): number {
    if (this.storeLength + 1 > this.store.length) this.growStore(this.storeLength + 1);
    this.store[this.storeLength++] = x;
    return this.closeColumn();
  }

  private growStore(atLeast: number): void {
    const grown = new Float64Array(Math.max(this.store.length * 2, atLeast));
    grown.set(this.store.subarray(0, this.storeLength));
    this.store = grown;
  }

  /** Ends the column whose entries were just appended to the store; returns its number. */
  private closeColumn(): number {
    const id = this.columnCount++;
    if (this.columnCount + 1 > this.starts.length) {
      const grown = new Int32Array(this.starts.length * 2);
      grown.set(this.starts);
      this.starts = grown;
    }
    this.starts[this.columnCount] = this.storeLength;
    return id;
  }

  /** Stores the scratch column with repeated simplices cancelled over Z/2; returns its column number. */
  private storeScratch(): number {
    let len = this.scratchLength;
    if (len > 1) len = keepOdd(this.scratch.subarray(0, len).sort());
    if (this.storeLength + len > this.store.length) this.growStore(this.storeLength + len);
    const store = this.store;
    const scratch = this.scratch;
    let w = this.storeLength;
    for (let q = 0; q < len; q++) store[w++] = scratch[q];
    this.storeLength = w;
    return this.closeColumn();
  }
}

function triangleRank(rankOf: Int32Array, n: number, a: number, b: number, c: number): number {
  const ab = rankOf[a * n + b];
  const ac = rankOf[a * n + c];
  const bc = rankOf[b * n + c];
  let r = ab > ac ? ab : ac;
  if (bc > r) r = bc;
  return r;
}

/** The number of the tetrahedron of the triangle a > b > c and a fourth vertex k. */
function fourthVertexNumber(
  a: number,
  b: number,
  c: number,
  k: number,
  c2: Float64Array,
  c3: Float64Array,
  c4: Float64Array,
): number {
  return k > a
    ? c4[k] + c3[a] + c2[b] + c
    : k > b
      ? c4[a] + c3[k] + c2[b] + c
      : k > c
        ? c4[a] + c3[b] + c2[k] + c
        : c4[a] + c3[b] + c2[c] + k;
}

/** A copy of `array` with room for `length` entries. */
function grown(array: Int32Array, length: number): Int32Array<ArrayBuffer> {
  const copy = new Int32Array(length);
  copy.set(array);
  return copy;
}

/** The first position p in [from, to) with ranks[p] > r, or `to`. */
function firstAbove(ranks: Int32Array, from: number, to: number, r: number): number {
  return firstAtLeast(ranks, from, to, r + 1);
}

/** Writes p, q, s in decreasing order into out[0..3). */
function sort3(p: number, q: number, s: number, out: Int32Array): void {
  let a = p;
  let b = q;
  let c = s;
  if (a < b) [a, b] = [b, a];
  if (b < c) [b, c] = [c, b];
  if (a < b) [a, b] = [b, a];
  out[0] = a;
  out[1] = b;
  out[2] = c;
}

/** Writes a > b > c and k in decreasing order into out[0..4). */
function sort4(a: number, b: number, c: number, k: number, out: Int32Array): void {
  if (k > a) {
    out[0] = k;
    out[1] = a;
    out[2] = b;
    out[3] = c;
  } else if (k > b) {
    out[0] = a;
    out[1] = k;
    out[2] = b;
    out[3] = c;
  } else if (k > c) {
    out[0] = a;
    out[1] = b;
    out[2] = k;
    out[3] = c;
  } else {
    out[0] = a;
    out[1] = b;
    out[2] = c;
    out[3] = k;
  }
}

/** Copies the first columns.length entries with the runs of equal rank in reverse order, each run kept in order. */
function reverseRuns(
  found: Float64Array,
  foundRanks: Int32Array,
  columns: Float64Array,
  columnRanks: Int32Array,
): void {
  let out = 0;
  for (let end = columns.length; end > 0; ) {
    let from = end - 1;
    while (from > 0 && foundRanks[from - 1] === foundRanks[end - 1]) from--;
    for (let i = from; i < end; i++) {
      columns[out] = found[i];
      columnRanks[out++] = foundRanks[i];
    }
    end = from;
  }
}
