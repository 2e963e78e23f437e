import { freemem } from 'node:os';
import { UserError } from '../core/errors.js';
import type { Diagram } from './diagram.js';
import { CofacetHeap, PivotMap } from './pivot-map.js';
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
 */
export interface RipsOptions {
  /** Highest homology degree computed. */
  maxDegree: 0 | 1 | 2;
  /** Largest filtration value kept (default: none, i.e. the enclosing radius). Classes alive at the cut get death Infinity. */
  maxScale?: number;
  /** Filtration value of each vertex (default 0); a simplex's value is the max of its edges' and vertices' values. */
  vertexValues?: Float64Array;
  /** Refuse when the estimated working memory exceeds this many bytes (default: 80 % of free memory, at least 1 GiB). */
  memoryLimit?: number;
}

const NO_EDGE = 0x7fffffff;

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

  // Effective edge values: max of the edge and its two vertices.
  let values = edgeValues;
  if (vertexValues !== undefined) {
    values = new Float64Array(edgeCount);
    for (let j = 1, e = 0; j < n; j++) {
      // invariant: e = condensed index of (i, j)
      for (let i = 0; i < j; i++, e++) {
        const v = edgeValues[e];
        values[e] = Math.max(v, vertexValues[i], vertexValues[j]);
      }
    }
  }
  for (let e = 0; e < edgeCount; e++) {
    if (Number.isNaN(values[e]) || values[e] < 0) {
      const [i, j] = [e - (edgeHighVertex(e) * (edgeHighVertex(e) - 1)) / 2, edgeHighVertex(e)];
      throw new UserError(
        `the distance between points ${i + 1} and ${j + 1} is ${values[e]}; distances must be numbers ≥ 0`,
      );
    }
  }

  let threshold = options.maxScale ?? Infinity;
  if (n >= 2) threshold = Math.min(threshold, enclosingRadius(n, values));

  checkSize(n, values, threshold, maxDegree, options.memoryLimit);

  // Edges inside the threshold in filtration order (value ascending, ties by decreasing index), by a
  // stable radix sort; `levels` are the distinct values and an edge's rank indexes them.
  const { order: orderedEdges, sorted: sortedValues } = sortEdges(values, threshold);
  const kept = orderedEdges.length;
  const rankCond = new Int32Array(edgeCount).fill(NO_EDGE);
  const rankSorted = new Int32Array(kept);
  let levelCount = 0;
  for (let k = 0; k < kept; k++) {
    const v = sortedValues[k];
    // invariant: sortedValues[0..levelCount) holds the distinct values among the first k, in order
    if (levelCount === 0 || sortedValues[levelCount - 1] !== v) sortedValues[levelCount++] = v;
    rankSorted[k] = levelCount - 1;
    rankCond[orderedEdges[k]] = levelCount - 1;
  }
  const levels = sortedValues.slice(0, levelCount);
  const rankOf = denseRanks(n, rankCond);

  const births0: number[] = [];
  const deaths0: number[] = [];
  const vertexValue = (v: number): number => (vertexValues === undefined ? 0 : vertexValues[v]);
  // H0 by union-find; edges that close a cycle become the degree-1 columns.
  const uf = new UnionFind(n);
  const cycleI = new Int32Array(kept);
  const cycleJ = new Int32Array(kept);
  const cycleRank = new Int32Array(kept);
  let cycleCount = 0;
  for (let k = 0; k < kept; k++) {
    const e = orderedEdges[k];
    const j = edgeHighVertex(e);
    const i = e - (j * (j - 1)) / 2;
    const ri = uf.find(i);
    const rj = uf.find(j);
    if (ri === rj) {
      cycleI[cycleCount] = i;
      cycleJ[cycleCount] = j;
      cycleRank[cycleCount] = rankSorted[k];
      cycleCount++;
      continue;
    }
    const oi = uf.oldest[ri];
    const oj = uf.oldest[rj];
    const bi = vertexValue(oi);
    const bj = vertexValue(oj);
    const iOlder = bi < bj || (bi === bj && oi < oj);
    const younger = iOlder ? oj : oi;
    const death = levels[rankSorted[k]];
    const birth = vertexValue(younger);
    if (death > birth) {
      births0.push(birth);
      deaths0.push(death);
    }
    uf.link(ri, rj, iOlder ? oi : oj);
  }
  for (let v = 0; v < n; v++) {
    if (uf.find(v) !== v) continue;
    const o = uf.oldest[v];
    if (vertexValue(o) > threshold) continue;
    births0.push(vertexValue(o));
    deaths0.push(Infinity);
  }
  const diagrams: Diagram[] = [
    { degree: 0, births: Float64Array.from(births0), deaths: Float64Array.from(deaths0) },
  ];
  if (maxDegree === 0) return diagrams;

  const table = new BinomialTable(n, 4);
  const engine = new Reduction(n, rankOf, levels, table);
  // Degree-1 columns: cycle edges in reverse filtration order.
  const pivots1 = new PivotMap(Math.max(16, cycleCount));
  diagrams.push(engine.reduceEdges(cycleI, cycleJ, cycleRank, cycleCount, pivots1));
  if (maxDegree === 1) return diagrams;

  const columns2 = triangleColumns(n, rankOf, levelCount, table, pivots1);
  const pivots2 = new PivotMap(Math.max(16, columns2.length >> 2));
  diagrams.push(engine.reduceTriangles(columns2, pivots2));
  return diagrams;
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
  const m = values.length;
  let kept = 0;
  for (let e = 0; e < m; e++) if (values[e] <= threshold) kept++;
  let order = new Int32Array(kept);
  let vals = new Float64Array(kept);
  for (let e = m - 1, k = 0; e >= 0; e--) {
    const v = values[e];
    if (!(v <= threshold)) continue;
    order[k] = e;
    vals[k++] = v === 0 ? 0 : v; // −0 sorts as 0
  }
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
      counts.fill(0);
      for (let k = 0; k < kept; k++) counts[(words[2 * k + word] >>> shift) & 0xffff]++;
      if (kept === 0 || counts[(words[word] >>> shift) & 0xffff] === kept) continue;
      let acc = 0;
      for (let d = 0; d < 65536; d++) {
        const c = counts[d];
        counts[d] = acc;
        acc += c;
      }
      // invariant: entries before k are placed, stably, by the digit of this pass
      for (let k = 0; k < kept; k++) {
        const p = counts[(words[2 * k + word] >>> shift) & 0xffff]++;
        order2[p] = order[k];
        vals2[p] = vals[k];
      }
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
  for (let k = 1; k < kept; k++) {
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
  return { order, sorted: vals };
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
  for (let j = 1, e = 0; j < n; j++) {
    // invariant: far[v] is the largest value seen among edges at v so far
    for (let i = 0; i < j; i++, e++) {
      const v = values[e];
      if (v > far[i]) far[i] = v;
      if (v > far[j]) far[j] = v;
    }
  }
  let r = Infinity;
  for (let i = 0; i < n; i++) if (far[i] < r) r = far[i];
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
  // Edges: sorted copy, ordered list, cycle list, degree-1 columns, pivot map (≈ 8+4+4+8+24 bytes each),
  // plus the dense rank table (4 n² bytes).
  let bytes = 4 * n * n + 48 * kept;
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

function checkSize(
  n: number,
  values: Float64Array,
  threshold: number,
  maxDegree: number,
  limit?: number,
): void {
  const budget = limit ?? Math.max(2 ** 30, 0.8 * freemem());
  const { bytes, edges, triangles } = estimateRipsBytes(n, values, threshold, maxDegree);
  if (bytes > budget) {
    const mb = (x: number): string => `${Math.round(x / 2 ** 20)} MB`;
    const what =
      maxDegree >= 2 ? `${edges} edges and about ${Math.round(triangles)} triangles` : `${edges} edges`;
    throw new UserError(
      `the Rips complex of ${n} points up to scale ${threshold} has ${what}, needing about ${mb(bytes)} ` +
        `(limit ${mb(budget)}); lower --max-scale, compute fewer degrees or subsample the cloud`,
    );
  }
}

/** Degree-2 columns: every triangle inside the threshold and not cleared, by rank descending then index ascending. */
function triangleColumns(
  n: number,
  rankOf: Int32Array,
  levelCount: number,
  table: BinomialTable,
  pivots1: PivotMap,
): Float64Array {
  const total = binomial(n, 3);
  const useBits = total <= 2 ** 28;
  let cleared: Uint8Array | undefined;
  if (useBits) {
    cleared = new Uint8Array(Math.ceil(total / 8));
    const bits = cleared;
    pivots1.forEachKey((t) => {
      bits[t >>> 3] |= 1 << (t & 7);
    });
  }
  const isCleared = (t: number): boolean =>
    cleared !== undefined ? (cleared[t >>> 3] & (1 << (t & 7))) !== 0 : pivots1.has(t);
  const b3 = table.row(3);
  const b2 = table.row(2);
  const counts = new Float64Array(levelCount + 1);
  for (let pass = 0; pass < 2; pass++) {
    let out: Float64Array | undefined;
    let next: Float64Array | undefined;
    if (pass === 1) {
      // Offsets for descending rank: ranks above r come first.
      next = new Float64Array(levelCount);
      let acc = 0;
      for (let r = levelCount - 1; r >= 0; r--) {
        next[r] = acc;
        acc += counts[r];
      }
      out = new Float64Array(acc);
    }
    for (let a = 2; a < n; a++) {
      const rowA = a * n;
      for (let b = 1; b < a; b++) {
        const rab = rankOf[rowA + b];
        if (rab === NO_EDGE) continue;
        const rowB = b * n;
        const base = b3[a] + b2[b];
        // invariant: triangles (a, b, c) are visited in increasing index base + c
        for (let c = 0; c < b; c++) {
          const rac = rankOf[rowA + c];
          const rbc = rankOf[rowB + c];
          if (rac === NO_EDGE || rbc === NO_EDGE) continue;
          let r = rab > rac ? rab : rac;
          if (rbc > r) r = rbc;
          const t = base + c;
          if (isCleared(t)) continue;
          if (pass === 0) counts[r]++;
          else (out as Float64Array)[(next as Float64Array)[r]++] = t;
        }
      }
    }
    if (pass === 1) return out as Float64Array;
  }
  return new Float64Array(0);
}

/** The reduction of degree-1 and degree-2 coboundary columns, sharing one heap and one store of columns. */
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

  constructor(
    private readonly n: number,
    private readonly rankOf: Int32Array,
    private readonly levels: Float64Array,
    private readonly table: BinomialTable,
  ) {
    this.step = Math.max(1, Math.ceil(levels.length / 64));
  }

  /**
   * Degree-1 columns: the cycle edges (lowEnds[c] < highEnds[c]) listed in filtration order, processed from
   * the last one back (reverse filtration order).
   */
  reduceEdges(
    lowEnds: Int32Array,
    highEnds: Int32Array,
    columnRanks: Int32Array,
    count: number,
    pivots: PivotMap,
  ): Diagram {
    const { n, rankOf, levels, heap } = this;
    const b2 = this.table.row(2);
    const b3 = this.table.row(3);
    const births: number[] = [];
    const deaths: number[] = [];
    this.resetStore();
    let previousRank = -1;
    for (let c = count - 1; c >= 0; c--) {
      const i = lowEnds[c];
      const j = highEnds[c];
      const e = (j * (j - 1)) / 2 + i;
      const rowI = i * n;
      const rowJ = j * n;
      const r = columnRanks[c];
      // Columns of larger rank only own pivots of larger rank, so the first column of each rank cannot
      // meet an owned cofacet of its own rank.
      const tied = r === previousRank;
      previousRank = r;
      // Emergent pair: the earliest cofacet is the first one of rank r met in decreasing index order.
      let emergent = -1;
      // invariant: no cofacet with third vertex above k has rank r
      for (let k = n - 1; k >= 0; k--) {
        const rki = rankOf[rowI + k];
        const rkj = rankOf[rowJ + k];
        if (rki > r || rkj > r) continue; // also skips k = i, j (NO_EDGE on the diagonal)
        const t = k > j ? b3[k] + b2[j] + i : k > i ? b3[j] + b2[k] + i : b3[j] + b2[i] + k;
        if (!tied || !pivots.has(t)) emergent = t;
        break;
      }
      if (emergent >= 0) {
        pivots.set(emergent, this.storeColumn1(e));
        continue;
      }
      heap.clear(r + this.step, this.step);
      this.scratchLength = 0;
      this.addEdgeCofacets(i, j, r);
      this.pushScratch(e);
      while (true) {
        if (!heap.popPivot()) {
          births.push(levels[r]);
          deaths.push(Infinity);
          break;
        }
        const owner = pivots.get(heap.pivotIndex);
        if (owner < 0) {
          const death = levels[heap.pivotRank];
          if (death > levels[r]) {
            births.push(levels[r]);
            deaths.push(death);
          }
          pivots.set(heap.pivotIndex, this.storeScratch());
          break;
        }
        heap.push(heap.pivotRank, heap.pivotIndex);
        const from = this.starts[owner];
        const to = this.starts[owner + 1];
        for (let s = from; s < to; s++) {
          const f = this.store[s];
          const fj = edgeHighVertex(f);
          const fi = f - (fj * (fj - 1)) / 2;
          this.addEdgeCofacets(fi, fj, rankOf[fi * n + fj]);
          this.pushScratch(f);
        }
      }
    }
    return { degree: 1, births: Float64Array.from(births), deaths: Float64Array.from(deaths) };
  }

  reduceTriangles(columns: Float64Array, pivots: PivotMap): Diagram {
    const { n, rankOf, levels, heap, vertices } = this;
    const b2 = this.table.row(2);
    const b3 = this.table.row(3);
    const b4 = this.table.row(4);
    const births: number[] = [];
    const deaths: number[] = [];
    this.resetStore();
    for (let col = 0; col < columns.length; col++) {
      const t = columns[col];
      this.table.vertices(t, 3, vertices);
      const a = vertices[0];
      const b = vertices[1];
      const c = vertices[2];
      const r = triangleRank(rankOf, n, a, b, c);
      let emergent = -1;
      const rowA = a * n;
      const rowB = b * n;
      const rowC = c * n;
      // invariant: no cofacet with fourth vertex above k has rank r
      for (let k = n - 1; k >= 0; k--) {
        const ra = rankOf[rowA + k];
        const rb = rankOf[rowB + k];
        const rc = rankOf[rowC + k];
        if (ra > r || rb > r || rc > r) continue; // also skips k = a, b, c
        const q =
          k > a
            ? b4[k] + b3[a] + b2[b] + c
            : k > b
              ? b4[a] + b3[k] + b2[b] + c
              : k > c
                ? b4[a] + b3[b] + b2[k] + c
                : b4[a] + b3[b] + b2[c] + k;
        if (!pivots.has(q)) emergent = q;
        break;
      }
      if (emergent >= 0) {
        pivots.set(emergent, this.storeColumn1(t));
        continue;
      }
      heap.clear(r + this.step, this.step);
      this.scratchLength = 0;
      this.addTriangleCofacets(a, b, c, r);
      this.pushScratch(t);
      while (true) {
        if (!heap.popPivot()) {
          births.push(levels[r]);
          deaths.push(Infinity);
          break;
        }
        const owner = pivots.get(heap.pivotIndex);
        if (owner < 0) {
          const death = levels[heap.pivotRank];
          if (death > levels[r]) {
            births.push(levels[r]);
            deaths.push(death);
          }
          pivots.set(heap.pivotIndex, this.storeScratch());
          break;
        }
        heap.push(heap.pivotRank, heap.pivotIndex);
        const from = this.starts[owner];
        const to = this.starts[owner + 1];
        for (let s = from; s < to; s++) {
          const f = this.store[s];
          this.table.vertices(f, 3, vertices);
          const fa = vertices[0];
          const fb = vertices[1];
          const fc = vertices[2];
          this.addTriangleCofacets(fa, fb, fc, triangleRank(rankOf, n, fa, fb, fc));
          this.pushScratch(f);
        }
      }
    }
    return { degree: 2, births: Float64Array.from(births), deaths: Float64Array.from(deaths) };
  }

  /** Pushes every cofacet {i, j, k} inside the threshold of the edge (i < j) of rank r. */
  private addEdgeCofacets(i: number, j: number, r: number): void {
    const { n, rankOf, heap } = this;
    const b2 = this.table.row(2);
    const b3 = this.table.row(3);
    const rowI = i * n;
    const rowJ = j * n;
    // invariant: cofacets with third vertex above k are in the heap
    for (let k = n - 1; k >= 0; k--) {
      const rki = rankOf[rowI + k];
      const rkj = rankOf[rowJ + k];
      if (rki === NO_EDGE || rkj === NO_EDGE) continue;
      let rk = rki > rkj ? rki : rkj;
      if (r > rk) rk = r;
      heap.push(rk, k > j ? b3[k] + b2[j] + i : k > i ? b3[j] + b2[k] + i : b3[j] + b2[i] + k);
    }
  }

  /** Pushes every cofacet inside the threshold of the triangle a > b > c of rank r. */
  private addTriangleCofacets(a: number, b: number, c: number, r: number): void {
    const { n, rankOf, heap } = this;
    const b2 = this.table.row(2);
    const b3 = this.table.row(3);
    const b4 = this.table.row(4);
    const rowA = a * n;
    const rowB = b * n;
    const rowC = c * n;
    // invariant: cofacets with fourth vertex above k are in the heap
    for (let k = n - 1; k >= 0; k--) {
      const ra = rankOf[rowA + k];
      const rb = rankOf[rowB + k];
      const rc = rankOf[rowC + k];
      if (ra === NO_EDGE || rb === NO_EDGE || rc === NO_EDGE) continue;
      let rk = ra > rb ? ra : rb;
      if (rc > rk) rk = rc;
      if (r > rk) rk = r;
      const q =
        k > a
          ? b4[k] + b3[a] + b2[b] + c
          : k > b
            ? b4[a] + b3[k] + b2[b] + c
            : k > c
              ? b4[a] + b3[b] + b2[k] + c
              : b4[a] + b3[b] + b2[c] + k;
      heap.push(rk, q);
    }
  }

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
    if (len > 1) {
      const s = this.scratch.subarray(0, len);
      s.sort();
      let w = 0;
      // invariant: s[0..w) holds the simplices of odd multiplicity among s[0..r)
      for (let r = 0; r < len; ) {
        let q = r + 1;
        while (q < len && s[q] === s[r]) q++;
        if ((q - r) & 1) s[w++] = s[r];
        r = q;
      }
      len = w;
    }
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
