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
  if (!(maxDegree === 0 || maxDegree === 1 || maxDegree === 2)) throw new RangeError(`maxDegree must be 0, 1 or 2, got ${maxDegree}`);
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
      throw new UserError(`the distance between points ${i + 1} and ${j + 1} is ${values[e]}; distances must be numbers ≥ 0`);
    }
  }

  let threshold = options.maxScale ?? Infinity;
  if (n >= 2) threshold = Math.min(threshold, enclosingRadius(n, values));

  checkSize(n, values, threshold, maxDegree, options.memoryLimit);

  // Distinct edge values up to the threshold, ascending: `levels`; the rank of an edge indexes them.
  let kept = 0;
  for (let e = 0; e < edgeCount; e++) if (values[e] <= threshold) kept++;
  const sorted = new Float64Array(kept);
  for (let e = 0, k = 0; e < edgeCount; e++) if (values[e] <= threshold) sorted[k++] = values[e];
  sorted.sort();
  let levelCount = 0;
  for (let k = 0; k < kept; k++) if (k === 0 || sorted[k] !== sorted[k - 1]) sorted[levelCount++] = sorted[k];
  const levels = sorted.slice(0, levelCount);

  // Dense table of edge ranks (NO_EDGE beyond the threshold and on the diagonal) and rank counts.
  const rankOf = new Int32Array(n * n).fill(NO_EDGE);
  const rankCount = new Int32Array(levelCount + 1);
  for (let j = 1, e = 0; j < n; j++) {
    // invariant: e = condensed index of (i, j)
    for (let i = 0; i < j; i++, e++) {
      const v = values[e];
      if (!(v <= threshold)) continue;
      let lo = 0;
      let hi = levelCount - 1;
      // invariant: levels[lo] ≤ v ≤ levels[hi]
      while (lo < hi) {
        const mid = (lo + hi) >> 1;
        if (levels[mid] < v) lo = mid + 1;
        else hi = mid;
      }
      rankOf[i * n + j] = lo;
      rankOf[j * n + i] = lo;
      rankCount[lo + 1]++;
    }
  }
  for (let r = 0; r < levelCount; r++) rankCount[r + 1] += rankCount[r];

  // Edges in filtration order: rank ascending, ties by decreasing index (counting sort, stable).
  const orderedEdges = new Int32Array(kept);
  {
    const next = rankCount.slice(0, levelCount);
    for (let j = n - 1; j >= 1; j--) {
      const base = (j * (j - 1)) / 2;
      // invariant: edges visited so far have larger condensed index than (i, j)
      for (let i = j - 1; i >= 0; i--) {
        const r = rankOf[i * n + j];
        if (r === NO_EDGE) continue;
        orderedEdges[next[r]++] = base + i;
      }
    }
  }

  const births0: number[] = [];
  const deaths0: number[] = [];
  const vertexValue = (v: number): number => (vertexValues === undefined ? 0 : vertexValues[v]);
  // H0 by union-find; edges that close a cycle become the degree-1 columns.
  const uf = new UnionFind(n);
  const cycleEdges = new Int32Array(kept);
  let cycleCount = 0;
  for (let k = 0; k < kept; k++) {
    const e = orderedEdges[k];
    const j = edgeHighVertex(e);
    const i = e - (j * (j - 1)) / 2;
    const ri = uf.find(i);
    const rj = uf.find(j);
    if (ri === rj) {
      cycleEdges[cycleCount++] = e;
      continue;
    }
    const oi = uf.oldest[ri];
    const oj = uf.oldest[rj];
    const bi = vertexValue(oi);
    const bj = vertexValue(oj);
    const iOlder = bi < bj || (bi === bj && oi < oj);
    const younger = iOlder ? oj : oi;
    const death = levels[rankOf[i * n + j]];
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
  const diagrams: Diagram[] = [{ degree: 0, births: Float64Array.from(births0), deaths: Float64Array.from(deaths0) }];
  if (maxDegree === 0) return diagrams;

  const table = new BinomialTable(n, 4);
  const engine = new Reduction(n, rankOf, levels, table);
  // Degree-1 columns: cycle edges in reverse filtration order.
  const columns1 = new Float64Array(cycleCount);
  for (let k = 0; k < cycleCount; k++) columns1[k] = cycleEdges[cycleCount - 1 - k];
  const pivots1 = new PivotMap(Math.max(16, cycleCount));
  diagrams.push(engine.reduceEdges(columns1, pivots1));
  if (maxDegree === 1) return diagrams;

  const columns2 = triangleColumns(n, rankOf, levelCount, table, pivots1);
  const pivots2 = new PivotMap(Math.max(16, columns2.length >> 2));
  diagrams.push(engine.reduceTriangles(columns2, pivots2));
  return diagrams;
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
export function estimateRipsBytes(n: number, values: Float64Array, threshold: number, maxDegree: number): { bytes: number; edges: number; triangles: number } {
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

function checkSize(n: number, values: Float64Array, threshold: number, maxDegree: number, limit?: number): void {
  const budget = limit ?? Math.max(2 ** 30, 0.8 * freemem());
  const { bytes, edges, triangles } = estimateRipsBytes(n, values, threshold, maxDegree);
  if (bytes > budget) {
    const mb = (x: number): string => `${Math.round(x / 2 ** 20)} MB`;
    const what = maxDegree >= 2 ? `${edges} edges and about ${Math.round(triangles)} triangles` : `${edges} edges`;
    throw new UserError(
      `the Rips complex of ${n} points up to scale ${threshold} has ${what}, needing about ${mb(bytes)} ` +
        `(limit ${mb(budget)}); lower --max-scale, compute fewer degrees or subsample the cloud`,
    );
  }
}

/** Degree-2 columns: every triangle inside the threshold and not cleared, by rank descending then index ascending. */
function triangleColumns(n: number, rankOf: Int32Array, levelCount: number, table: BinomialTable, pivots1: PivotMap): Float64Array {
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
  const isCleared = (t: number): boolean => (cleared !== undefined ? (cleared[t >>> 3] & (1 << (t & 7))) !== 0 : pivots1.has(t));
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

  constructor(
    private readonly n: number,
    private readonly rankOf: Int32Array,
    private readonly levels: Float64Array,
    private readonly table: BinomialTable,
  ) {}

  reduceEdges(columns: Float64Array, pivots: PivotMap): Diagram {
    const { n, rankOf, levels, heap } = this;
    const b2 = this.table.row(2);
    const b3 = this.table.row(3);
    const births: number[] = [];
    const deaths: number[] = [];
    this.resetStore();
    for (let c = 0; c < columns.length; c++) {
      const e = columns[c];
      const j = edgeHighVertex(e);
      const i = e - (j * (j - 1)) / 2;
      const r = rankOf[i * n + j];
      // Emergent pair: the earliest cofacet is the first one of rank r met in decreasing index order.
      let emergent = -1;
      for (let k = n - 1; k >= 0; k--) {
        const rki = rankOf[k * n + i];
        const rkj = rankOf[k * n + j];
        if (rki > r || rkj > r) continue; // also skips k = i, j (NO_EDGE on the diagonal)
        const t = k > j ? b3[k] + b2[j] + i : k > i ? b3[j] + b2[k] + i : b3[j] + b2[i] + k;
        if (!pivots.has(t)) emergent = t;
        break;
      }
      if (emergent >= 0) {
        pivots.set(emergent, this.storeColumn1(e));
        continue;
      }
      heap.clear();
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
      for (let k = n - 1; k >= 0; k--) {
        const ra = rankOf[k * n + a];
        const rb = rankOf[k * n + b];
        const rc = rankOf[k * n + c];
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
      heap.clear();
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
    this.scratchLength = 0;
    this.pushScratch(x);
    return this.storeScratch();
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
    if (this.storeLength + len > this.store.length) {
      const grown = new Float64Array(Math.max(this.store.length * 2, this.storeLength + len));
      grown.set(this.store.subarray(0, this.storeLength));
      this.store = grown;
    }
    this.store.set(this.scratch.subarray(0, len), this.storeLength);
    this.storeLength += len;
    const id = this.columnCount++;
    if (this.columnCount + 1 > this.starts.length) {
      const grown = new Int32Array(this.starts.length * 2);
      grown.set(this.starts);
      this.starts = grown;
    }
    this.starts[this.columnCount] = this.storeLength;
    return id;
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
