// AssemblyScript, compiled to WebAssembly by `npm run kernel` (wasm/build.mjs) into
// src/homology/rips-kernel-bytes.ts. Not part of the TypeScript build: i32, f64, load and store are
// AssemblyScript's.
//
// Vietoris–Rips persistence in degrees 0 and 1 — the same algorithm, step for step, as ripsPersistence in
// src/homology/rips.ts with maxDegree ≤ 1 and no collapse (read the comments there): edges sorted by value
// (ties by decreasing condensed index), H0 by union-find with the elder rule, H1 by the cohomology reduction
// with apparent and emergent pairs, the cofacets of an edge enumerated from neighbour rows up to a cap that
// doubles. The diagrams are the same pairs in the same order; the engine exists because compiled WebAssembly
// is shared by every thread of a process, where each thread compiles JavaScript for itself (the warm-up that
// kept two threads from doubling the speed).
//
// Memory: a bump allocator over the module's memory, reset at the start of each sample (`prepare`). Simplex
// numbers are i64.


// ------------------------------------------------------------------------------------------------ memory

let top: usize = 0;

function alloc(bytes: usize): usize {
  const p = (top + 15) & ~(<usize>15);
  const end = p + bytes;
  const pages = <i32>((end + 0xffff) >>> 16);
  const have = memory.size();
  if (pages > have && memory.grow(pages - have) < 0) unreachable();
  top = end;
  return p;
}

function zeroed(bytes: usize): usize {
  const p = alloc(bytes);
  memory.fill(p, 0, bytes);
  return p;
}

// @ts-ignore: decorator
@inline function getF(p: usize, i: i32): f64 {
  return load<f64>(p + ((<usize>i) << 3));
}
// @ts-ignore: decorator
@inline function setF(p: usize, i: i32, v: f64): void {
  store<f64>(p + ((<usize>i) << 3), v);
}
// @ts-ignore: decorator
@inline function getI(p: usize, i: i32): i32 {
  return load<i32>(p + ((<usize>i) << 2));
}
// @ts-ignore: decorator
@inline function setI(p: usize, i: i32, v: i32): void {
  store<i32>(p + ((<usize>i) << 2), v);
}
// @ts-ignore: decorator
@inline function getL(p: usize, i: i32): i64 {
  return load<i64>(p + ((<usize>i) << 3));
}
// @ts-ignore: decorator
@inline function setL(p: usize, i: i32, v: i64): void {
  store<i64>(p + ((<usize>i) << 3), v);
}

// ------------------------------------------------------------------------------------------------ input and output

let valuesPtr: usize = 0;
let vertexPtr: usize = 0;
let births0: usize = 0;
let deaths0: usize = 0;
let count0: i32 = 0;
let births1: usize = 0;
let deaths1: usize = 0;
let count1: i32 = 0;
let badEdge: i32 = -1;

/** Starts a sample of n vertices: returns where its n(n−1)/2 edge values go (then n vertex values). */
export function prepare(n: i32): usize {
  top = __heap_base;
  const m = <usize>n * <usize>(n - 1) / 2;
  valuesPtr = alloc(m << 3);
  vertexPtr = alloc((<usize>n) << 3);
  return valuesPtr;
}

let coordsPtr: usize = 0;

/** Starts a cloud of n points in dim dimensions: returns where its coordinates go (row-major). */
export function preparePoints(n: i32, dim: i32): usize {
  prepare(n);
  coordsPtr = alloc(<usize>n * <usize>dim * 8);
  return coordsPtr;
}

/**
 * `compute` for the cloud written by `preparePoints`, its edge values the distances between the points
 * (metric 0 Euclidean, 1 Manhattan, 2 Chebyshev), summed in the order pairwiseDistances (metric.ts) sums
 * them, so the values are the same doubles.
 */
export function computePoints(n: i32, dim: i32, metric: i32, maxScale: f64, maxDegree: i32): i32 {
  const c = coordsPtr;
  const out = valuesPtr;
  let e = 0;
  for (let j = 1; j < n; j++) {
    const oj = j * dim;
    for (let i = 0; i < j; i++, e++) {
      const oi = i * dim;
      let acc: f64 = 0;
      if (metric == 0) {
        for (let d = 0; d < dim; d++) {
          const x = getF(c, oi + d) - getF(c, oj + d);
          acc += x * x;
        }
        acc = Math.sqrt(acc);
      } else if (metric == 1) {
        for (let d = 0; d < dim; d++) acc += Math.abs(getF(c, oi + d) - getF(c, oj + d));
      } else {
        for (let d = 0; d < dim; d++) {
          const x = Math.abs(getF(c, oi + d) - getF(c, oj + d));
          if (x > acc) acc = x;
        }
      }
      setF(out, e, acc);
    }
  }
  return compute(n, 0, maxScale, maxDegree);
}

export function vertexValues(): usize {
  return vertexPtr;
}
export function pairCount(degree: i32): i32 {
  return degree == 0 ? count0 : count1;
}
export function birthsOf(degree: i32): usize {
  return degree == 0 ? births0 : births1;
}
export function deathsOf(degree: i32): usize {
  return degree == 0 ? deaths0 : deaths1;
}
/** The first edge whose value is NaN or negative, after `compute` returned 1. */
export function invalidEdge(): i32 {
  return badEdge;
}

/**
 * The diagrams of the sample written by `prepare`: 0 when done (read them with pairCount, birthsOf and
 * deathsOf), 1 when an edge value is not a number ≥ 0 (invalidEdge). maxScale is Infinity for none.
 */
export function compute(n: i32, hasVertexValues: i32, maxScale: f64, maxDegree: i32): i32 {
  const m = <i32>((<i64>n * <i64>(n - 1)) / 2);
  const values = valuesPtr;
  if (hasVertexValues) raiseByVertices(n, values, vertexPtr);
  else memory.fill(vertexPtr, 0, (<usize>n) << 3);
  for (let e = 0; e < m; e++) {
    if (!(getF(values, e) >= 0)) {
      badEdge = e;
      return 1;
    }
  }
  let threshold = maxScale;
  if (n >= 2) {
    const r = enclosingRadius(n, values);
    if (r < threshold) threshold = r;
  }

  // Edges inside the threshold in filtration order, their distinct values (levels) and ranks.
  const kept = sortEdges(values, m, threshold);
  const order = sortedOrder;
  const levels = sortedValues;
  const rankSorted = alloc((<usize>kept) << 2);
  let levelCount = 0;
  for (let k = 0; k < kept; k++) {
    const v = getF(levels, k);
    if (levelCount == 0 || getF(levels, levelCount - 1) != v) setF(levels, levelCount++, v);
    setI(rankSorted, k, levelCount - 1);
  }

  // Endpoints of the ordered edges.
  const low = alloc((<usize>kept) << 2);
  const high = alloc((<usize>kept) << 2);
  for (let k = 0; k < kept; k++) {
    const e = getI(order, k);
    const j = highVertex(e);
    setI(low, k, e - <i32>((<i64>j * <i64>(j - 1)) / 2));
    setI(high, k, j);
  }

  // H0: union-find, elder rule; the edges that close a cycle become the degree-1 columns.
  const parent = alloc((<usize>n) << 2);
  const size = alloc((<usize>n) << 2);
  const oldest = alloc((<usize>n) << 2);
  for (let v = 0; v < n; v++) {
    setI(parent, v, v);
    setI(size, v, 1);
    setI(oldest, v, v);
  }
  const vv = vertexPtr;
  births0 = alloc((<usize>n) << 3);
  deaths0 = alloc((<usize>n) << 3);
  count0 = 0;
  const cycleLow = alloc((<usize>kept) << 2);
  const cycleHigh = alloc((<usize>kept) << 2);
  const cycleRank = alloc((<usize>kept) << 2);
  let cycles = 0;
  for (let k = 0; k < kept; k++) {
    const i = getI(low, k);
    const j = getI(high, k);
    const ri = find(parent, i);
    const rj = find(parent, j);
    if (ri == rj) {
      setI(cycleLow, cycles, i);
      setI(cycleHigh, cycles, j);
      setI(cycleRank, cycles, getI(rankSorted, k));
      cycles++;
      continue;
    }
    const oi = getI(oldest, ri);
    const oj = getI(oldest, rj);
    const bi = getF(vv, oi);
    const bj = getF(vv, oj);
    const iOlder = bi < bj || (bi == bj && oi < oj);
    const death = getF(levels, getI(rankSorted, k));
    const birth = iOlder ? bj : bi;
    if (death > birth) {
      setF(births0, count0, birth);
      setF(deaths0, count0, death);
      count0++;
    }
    // link
    let root = ri;
    let child = rj;
    if (getI(size, ri) < getI(size, rj)) {
      root = rj;
      child = ri;
    }
    setI(parent, child, root);
    setI(size, root, getI(size, root) + getI(size, child));
    setI(oldest, root, iOlder ? oi : oj);
  }
  for (let v = 0; v < n; v++) {
    if (find(parent, v) != v) continue;
    const b = getF(vv, getI(oldest, v));
    if (b > threshold) continue;
    setF(births0, count0, b);
    setF(deaths0, count0, Infinity);
    count0++;
  }
  count1 = 0;
  if (maxDegree == 0) return 0;

  // Neighbour rows in filtration order.
  const start = zeroed((<usize>(n + 1)) << 2);
  for (let k = 0; k < kept; k++) {
    const a = getI(low, k) + 1;
    const b = getI(high, k) + 1;
    setI(start, a, getI(start, a) + 1);
    setI(start, b, getI(start, b) + 1);
  }
  for (let v = 1; v <= n; v++) setI(start, v, getI(start, v) + getI(start, v - 1));
  // The rank table and the rows in 16-bit entries when ranks and vertices fit: half the memory read at
  // random (clouds of 300 points: 2–3% faster, measured).
  if (levelCount < 0xffff && n < 0xffff)
    degreeOne<u16>(n, kept, low, high, rankSorted, start, levels, levelCount, cycleLow, cycleHigh, cycleRank, cycles);
  else
    degreeOne<i32>(n, kept, low, high, rankSorted, start, levels, levelCount, cycleLow, cycleHigh, cycleRank, cycles);
  return 0;
}

/**
 * Degree 1 with rank-table and row entries of type R (u16 or i32): the dense symmetric table of ranks (all
 * bits set off the filtration for u16, 0x7f7f7f7f for i32 — above every rank either way), each vertex's
 * neighbours in filtration order, then the reduction.
 */
function degreeOne<R>(
  n: i32,
  kept: i32,
  low: usize,
  high: usize,
  rankSorted: usize,
  start: usize,
  levels: usize,
  levelCount: i32,
  cycleLow: usize,
  cycleHigh: usize,
  cycleRank: usize,
  cycles: i32,
): void {
  const bytes = <usize>n * <usize>n * sizeof<R>();
  const rankOf = alloc(bytes);
  memory.fill(rankOf, sizeof<R>() == 2 ? 0xff : 0x7f, bytes);
  const fill = alloc((<usize>n) << 2);
  memory.copy(fill, start, (<usize>n) << 2);
  const rowVertex = alloc(<usize>kept * 2 * sizeof<R>());
  const rowRank = alloc(<usize>kept * 2 * sizeof<R>());
  for (let k = 0; k < kept; k++) {
    const i = getI(low, k);
    const j = getI(high, k);
    const r = getI(rankSorted, k);
    putR<R>(rankOf, i * n + j, r);
    putR<R>(rankOf, j * n + i, r);
    let p = getI(fill, i);
    setI(fill, i, p + 1);
    putR<R>(rowVertex, p, j);
    putR<R>(rowRank, p, r);
    p = getI(fill, j);
    setI(fill, j, p + 1);
    putR<R>(rowVertex, p, i);
    putR<R>(rowRank, p, r);
  }
  reduceEdges<R>(n, rankOf, levels, levelCount, start, rowVertex, rowRank, cycleLow, cycleHigh, cycleRank, cycles);
}

// @ts-ignore: decorator
@inline function getR<R>(p: usize, i: i32): i32 {
  return <i32>load<R>(p + (<usize>i) * sizeof<R>());
}
// @ts-ignore: decorator
@inline function putR<R>(p: usize, i: i32, v: i32): void {
  store<R>(p + (<usize>i) * sizeof<R>(), <R>v);
}

function raiseByVertices(n: i32, values: usize, vv: usize): void {
  let e = 0;
  for (let j = 1; j < n; j++) {
    const bj = getF(vv, j);
    for (let i = 0; i < j; i++, e++) {
      const v = getF(values, e);
      // Math.max semantics: NaN stays NaN.
      const bi = getF(vv, i);
      setF(values, e, v != v ? v : Math.max(Math.max(v, bi), bj));
    }
  }
}

function find(parent: usize, x: i32): i32 {
  while (getI(parent, x) != x) {
    const g = getI(parent, getI(parent, x));
    setI(parent, x, g);
    x = g;
  }
  return x;
}

function highVertex(e: i32): i32 {
  let j = <i32>Math.floor((1.0 + Math.sqrt(1.0 + 8.0 * <f64>e)) / 2.0);
  while ((<i64>j * <i64>(j - 1)) / 2 > <i64>e) j--;
  while ((<i64>(j + 1) * <i64>j) / 2 <= <i64>e) j++;
  return j;
}

function enclosingRadius(n: i32, values: usize): f64 {
  const far = zeroed((<usize>n) << 3);
  let e = 0;
  for (let j = 1; j < n; j++) {
    for (let i = 0; i < j; i++, e++) {
      const v = getF(values, e);
      if (v > getF(far, i)) setF(far, i, v);
      if (v > getF(far, j)) setF(far, j, v);
    }
  }
  let r = Infinity;
  for (let i = 0; i < n; i++) if (getF(far, i) < r) r = getF(far, i);
  return r;
}

// ------------------------------------------------------------------------------------------------ sorting edges

let sortedOrder: usize = 0;
let sortedValues: usize = 0;

/**
 * The edges of value ≤ threshold sorted by value, ties by decreasing condensed index (sortedOrder,
 * sortedValues); returns how many. As sortEdges in rips.ts: a stable radix sort on the high 32 bits of the
 * doubles (all four 16-bit digits when long runs share them), fed in decreasing index order, then an
 * insertion pass.
 */
function sortEdges(values: usize, m: i32, threshold: f64): i32 {
  let kept = 0;
  for (let e = 0; e < m; e++) if (getF(values, e) <= threshold) kept++;
  let order = alloc((<usize>kept) << 2);
  let vals = alloc((<usize>kept) << 3);
  let k = 0;
  for (let e = m - 1; e >= 0; e--) {
    const v = getF(values, e);
    if (!(v <= threshold)) continue;
    setI(order, k, e);
    setF(vals, k++, v == 0 ? 0 : v);
  }
  let order2 = alloc((<usize>kept) << 2);
  let vals2 = alloc((<usize>kept) << 3);
  const counts = alloc(65536 << 2);
  for (let round = 0; round < 2; round++) {
    const passes = round == 0 ? 2 : 4;
    for (let s = 0; s < passes; s++) {
      // Round 0: high word, low then high digit. Round 1: low word's two digits, then the high word's.
      const word: usize = round == 0 ? 1 : s < 2 ? 0 : 1;
      const shift: u32 = (s & 1) == 0 ? 0 : 16;
      memory.fill(counts, 0, 65536 << 2);
      for (let q = 0; q < kept; q++) {
        const d = <i32>((load<u32>(vals + ((<usize>q) << 3) + (word << 2)) >>> shift) & 0xffff);
        setI(counts, d, getI(counts, d) + 1);
      }
      if (kept == 0) continue;
      const first = <i32>((load<u32>(vals + (word << 2)) >>> shift) & 0xffff);
      if (getI(counts, first) == kept) continue;
      let acc = 0;
      for (let d = 0; d < 65536; d++) {
        const c = getI(counts, d);
        setI(counts, d, acc);
        acc += c;
      }
      for (let q = 0; q < kept; q++) {
        const d = <i32>((load<u32>(vals + ((<usize>q) << 3) + (word << 2)) >>> shift) & 0xffff);
        const p = getI(counts, d);
        setI(counts, d, p + 1);
        setI(order2, p, getI(order, q));
        setF(vals2, p, getF(vals, q));
      }
      const o = order;
      order = order2;
      order2 = o;
      const w = vals;
      vals = vals2;
      vals2 = w;
    }
    if (round == 1 || longestRun(vals, kept) <= 32) break;
  }
  for (let q = 1; q < kept; q++) {
    const v = getF(vals, q);
    if (getF(vals, q - 1) <= v) continue;
    const e = getI(order, q);
    let p = q - 1;
    while (p >= 0 && getF(vals, p) > v) {
      setF(vals, p + 1, getF(vals, p));
      setI(order, p + 1, getI(order, p));
      p--;
    }
    setF(vals, p + 1, v);
    setI(order, p + 1, e);
  }
  sortedOrder = order;
  sortedValues = vals;
  return kept;
}

function longestRun(vals: usize, kept: i32): i32 {
  let best = kept > 0 ? 1 : 0;
  let run = 1;
  for (let k = 1; k < kept; k++) {
    const a = load<u32>(vals + ((<usize>k) << 3) + 4);
    const b = load<u32>(vals + ((<usize>(k - 1)) << 3) + 4);
    run = a == b ? run + 1 : 1;
    if (run > best) best = run;
  }
  return best;
}

// ------------------------------------------------------------------------------------------------ degree 1

// The reduction's state for one sample (see the class Reduction in rips.ts).
let N: i32 = 0;
let rankOfP: usize = 0;
let startP: usize = 0;
let rowVertexP: usize = 0;
let rowRankP: usize = 0;
let c2P: usize = 0; // C(v, 2), i64
let c3P: usize = 0; // C(v, 3), i64
let topRank: i32 = 0;
let cap: i32 = 0;
let capStep: i32 = 1;
let found: i32 = -1;
let facet: i64 = 0;

// The working column: a binary heap of (rank, triangle number), smallest rank first, ties to the largest number.
let heapRanks: usize = 0;
let heapIndices: usize = 0;
let heapSize: i32 = 0;
let heapCapacity: i32 = 0;
let pivotRank: i32 = 0;
let pivotIndex: i64 = 0;

// The scratch column (edges added) and the stored reduction columns.
let scratch: usize = 0;
let scratchLength: i32 = 0;
let scratchCapacity: i32 = 0;
let storeP: usize = 0;
let storeLength: i32 = 0;
let storeCapacity: i32 = 0;
let startsP: usize = 0;
let columnCount: i32 = 0;
let startsCapacity: i32 = 0;

// Pivots: open addressing, linear probing, triangle number → column number.
let mapKeys: usize = 0;
let mapValues: usize = 0;
let mapMask: i32 = 0;
let mapCount: i32 = 0;

function reduceEdges<R>(
  n: i32,
  rankOf: usize,
  levels: usize,
  levelCount: i32,
  start: usize,
  rowVertex: usize,
  rowRank: usize,
  lowEnds: usize,
  highEnds: usize,
  columnRanks: usize,
  count: i32,
): void {
  N = n;
  rankOfP = rankOf;
  startP = start;
  rowVertexP = rowVertex;
  rowRankP = rowRank;
  c2P = alloc((<usize>(n + 1)) << 3);
  c3P = alloc((<usize>(n + 1)) << 3);
  for (let v = 0; v <= n; v++) {
    const w = <i64>v;
    setL(c2P, v, (w * (w - 1)) / 2);
    setL(c3P, v, (w * (w - 1) * (w - 2)) / 6);
  }
  const step = max<i32>(1, (levelCount + 63) / 64);
  topRank = levelCount - 1;
  births1 = alloc((<usize>max<i32>(count, 1)) << 3);
  deaths1 = alloc((<usize>max<i32>(count, 1)) << 3);
  count1 = 0;
  heapCapacity = 4096;
  heapRanks = alloc((<usize>heapCapacity) << 2);
  heapIndices = alloc((<usize>heapCapacity) << 3);
  scratchCapacity = 256;
  scratch = alloc((<usize>scratchCapacity) << 3);
  storeCapacity = 1 << 16;
  storeP = alloc((<usize>storeCapacity) << 3);
  startsCapacity = 1 << 12;
  startsP = alloc((<usize>startsCapacity) << 2);
  storeLength = 0;
  columnCount = 0;
  setI(startsP, 0, 0);
  let cap0 = 16;
  while (cap0 < max<i32>(16, count >> 3) * 2) cap0 *= 2;
  mapKeys = alloc((<usize>cap0) << 3);
  memory.fill(mapKeys, 0xff, (<usize>cap0) << 3); // −1: empty
  mapValues = alloc((<usize>cap0) << 2);
  mapMask = cap0 - 1;
  mapCount = 0;

  let previousRank = -1;
  for (let col = count - 1; col >= 0; col--) {
    const i = getI(lowEnds, col);
    const j = getI(highEnds, col);
    const r = getI(columnRanks, col);
    const e = getL(c2P, j) + <i64>i;
    const tied = r == previousRank;
    previousRank = r;
    const t = oldestOfEdge<R>(i, j, r);
    if (t >= 0) {
      const k = found;
      if (youngestEdge<R>(i, j, k, r)) continue; // apparent pair
      // sort3(i, j, k) descending
      let a = i;
      let b = j;
      let c = k;
      if (a < b) {
        const x = a;
        a = b;
        b = x;
      }
      if (b < c) {
        const x = b;
        b = c;
        c = x;
      }
      if (a < b) {
        const x = a;
        a = b;
        b = x;
      }
      if (!(tied && mapGet(t) >= 0) && !apparentEdge<R>(a, b, c, r, t)) {
        mapSet(t, storeColumn1(e)); // emergent pair
        continue;
      }
    }
    heapSize = 0;
    scratchLength = 0;
    capStep = step;
    cap = min<i32>(topRank, r + capStep);
    addEdgeCofacets<R>(i, j, r, -1, cap);
    pushScratch(e);
    while (true) {
      if (!nextPivot<R>()) {
        setF(births1, count1, getF(levels, r));
        setF(deaths1, count1, Infinity);
        count1++;
        break;
      }
      const pr = pivotRank;
      const pi = pivotIndex;
      const owner = mapGet(pi);
      if (owner >= 0) {
        heapPush(pr, pi);
        const end = getI(startsP, owner + 1);
        for (let s = getI(startsP, owner); s < end; s++) addEdge<R>(getL(storeP, s));
        continue;
      }
      // The vertices a > b > c of the triangle pi.
      const a = maxVertex(c3P, pi, n - 1);
      const rest = pi - getL(c3P, a);
      const b = maxVertex(c2P, rest, a - 1);
      const c = <i32>(rest - getL(c2P, b));
      if (apparentEdge<R>(a, b, c, pr, pi)) {
        heapPush(pr, pi);
        addEdge<R>(facet);
        continue;
      }
      const death = getF(levels, pr);
      if (death > getF(levels, r)) {
        setF(births1, count1, getF(levels, r));
        setF(deaths1, count1, death);
        count1++;
      }
      mapSet(pi, storeScratch());
      break;
    }
  }
}

/** The largest v ≤ top with row[v] ≤ index (row = C(·, k), increasing). */
function maxVertex(row: usize, index: i64, top: i32): i32 {
  let lo = 0;
  let hi = top;
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (getL(row, mid) <= index) lo = mid;
    else hi = mid - 1;
  }
  return lo;
}

// @ts-ignore: decorator
@inline function triangleNumber(i: i32, j: i32, k: i32): i64 {
  // i < j; k any other vertex
  return k > j
    ? getL(c3P, k) + getL(c2P, j) + <i64>i
    : k > i
      ? getL(c3P, j) + getL(c2P, k) + <i64>i
      : getL(c3P, j) + getL(c2P, i) + <i64>k;
}

/** The oldest cofacet of the edge (i < j) of rank r as a triangle number, or −1; sets `found`. */
function oldestOfEdge<R>(i: i32, j: i32, r: i32): i64 {
  const rowI = i * N;
  const rowJ = j * N;
  // The largest vertex joined to i and j by edges of rank ≤ r. (Scanning the shorter neighbour row up to rank
  // r instead was 1.6–2.7× slower here: most columns are long edges, where this scan stops within a few tries.)
  for (let k = N - 1; k >= 0; k--) {
    if (getR<R>(rankOfP, rowI + k) > r || getR<R>(rankOfP, rowJ + k) > r) continue;
    found = k;
    return triangleNumber(i, j, k);
  }
  return -1;
}

function youngestEdge<R>(i: i32, j: i32, k: i32, r: i32): bool {
  const e = getL(c2P, j) + <i64>i;
  if (getR<R>(rankOfP, i * N + k) == r && (k > i ? getL(c2P, k) + <i64>i : getL(c2P, i) + <i64>k) < e) return false;
  if (getR<R>(rankOfP, j * N + k) == r && (k > j ? getL(c2P, k) + <i64>j : getL(c2P, j) + <i64>k) < e) return false;
  return true;
}

function apparentEdge<R>(a: i32, b: i32, c: i32, r: i32, t: i64): bool {
  let lo: i32;
  let hi: i32;
  if (getR<R>(rankOfP, c * N + b) == r) {
    lo = c;
    hi = b;
  } else if (getR<R>(rankOfP, c * N + a) == r) {
    lo = c;
    hi = a;
  } else {
    lo = b;
    hi = a;
  }
  if (oldestOfEdge<R>(lo, hi, r) != t) return false;
  facet = getL(c2P, hi) + <i64>lo;
  return true;
}

function addEdge<R>(f: i64): void {
  const fj = maxVertex(c2P, f, N - 1);
  const fi = <i32>(f - getL(c2P, fj));
  addEdgeCofacets<R>(fi, fj, getR<R>(rankOfP, fi * N + fj), -1, cap);
  pushScratch(f);
}

function nextPivot<R>(): bool {
  while (!popPivot()) {
    if (cap >= topRank) return false;
    const lo = cap;
    capStep *= 2;
    cap = min<i32>(topRank, lo + capStep);
    for (let s = 0; s < scratchLength; s++) {
      const f = getL(scratch, s);
      const fj = maxVertex(c2P, f, N - 1);
      const fi = <i32>(f - getL(c2P, fj));
      addEdgeCofacets<R>(fi, fj, getR<R>(rankOfP, fi * N + fj), lo, cap);
    }
  }
  return true;
}

function addEdgeCofacets<R>(i: i32, j: i32, r: i32, lo: i32, hi: i32): void {
  const rowJ = j * N;
  const end = getI(startP, i + 1);
  for (let p = getI(startP, i); p < end; p++) {
    const rki = getR<R>(rowRankP, p);
    if (rki > hi) break;
    const k = getR<R>(rowVertexP, p);
    const rkj = getR<R>(rankOfP, rowJ + k); // off the filtration: above every rank, so above hi
    let rk = rki > rkj ? rki : rkj;
    if (r > rk) rk = r;
    if (rk <= lo || rk > hi) continue;
    heapPush(rk, triangleNumber(i, j, k));
  }
}

// ---------------------------------------------------------------- the working column

function heapPush(rank: i32, index: i64): void {
  if (heapSize == heapCapacity) {
    const r = alloc((<usize>heapCapacity) << 3);
    memory.copy(r, heapRanks, (<usize>heapCapacity) << 2);
    const x = alloc((<usize>heapCapacity) << 4);
    memory.copy(x, heapIndices, (<usize>heapCapacity) << 3);
    heapRanks = r;
    heapIndices = x;
    heapCapacity *= 2;
  }
  let i = heapSize++;
  while (i > 0) {
    const p = (i - 1) >> 1;
    const pr = getI(heapRanks, p);
    if (pr < rank || (pr == rank && getL(heapIndices, p) >= index)) break;
    setI(heapRanks, i, pr);
    setL(heapIndices, i, getL(heapIndices, p));
    i = p;
  }
  setI(heapRanks, i, rank);
  setL(heapIndices, i, index);
}

function popTop(): void {
  const n = --heapSize;
  if (n == 0) return;
  const rank = getI(heapRanks, n);
  const index = getL(heapIndices, n);
  let i = 0;
  while (true) {
    let c = 2 * i + 1;
    if (c >= n) break;
    const d = c + 1;
    if (d < n) {
      const rd = getI(heapRanks, d);
      const rc = getI(heapRanks, c);
      if (rd < rc || (rd == rc && getL(heapIndices, d) > getL(heapIndices, c))) c = d;
    }
    const rc = getI(heapRanks, c);
    if (rank < rc || (rank == rc && index >= getL(heapIndices, c))) break;
    setI(heapRanks, i, rc);
    setL(heapIndices, i, getL(heapIndices, c));
    i = c;
  }
  setI(heapRanks, i, rank);
  setL(heapIndices, i, index);
}

/** The first entry of odd multiplicity, removed, in pivotRank/pivotIndex; false when the column is zero. */
function popPivot(): bool {
  while (heapSize > 0) {
    const rank = getI(heapRanks, 0);
    const index = getL(heapIndices, 0);
    let multiplicity = 0;
    while (heapSize > 0 && getL(heapIndices, 0) == index) {
      popTop();
      multiplicity++;
    }
    if (multiplicity & 1) {
      pivotRank = rank;
      pivotIndex = index;
      return true;
    }
  }
  return false;
}

// ---------------------------------------------------------------- stored columns

function pushScratch(x: i64): void {
  if (scratchLength == scratchCapacity) {
    const s = alloc((<usize>scratchCapacity) << 4);
    memory.copy(s, scratch, (<usize>scratchCapacity) << 3);
    scratch = s;
    scratchCapacity *= 2;
  }
  setL(scratch, scratchLength++, x);
}

function reserveStore(atLeast: i32): void {
  if (atLeast <= storeCapacity) return;
  let c = storeCapacity * 2;
  if (c < atLeast) c = atLeast;
  const s = alloc((<usize>c) << 3);
  memory.copy(s, storeP, (<usize>storeLength) << 3);
  storeP = s;
  storeCapacity = c;
}

function closeColumn(): i32 {
  const id = columnCount++;
  if (columnCount + 1 > startsCapacity) {
    const s = alloc((<usize>startsCapacity) << 3);
    memory.copy(s, startsP, (<usize>startsCapacity) << 2);
    startsP = s;
    startsCapacity *= 2;
  }
  setI(startsP, columnCount, storeLength);
  return id;
}

function storeColumn1(x: i64): i32 {
  reserveStore(storeLength + 1);
  setL(storeP, storeLength++, x);
  return closeColumn();
}

function storeScratch(): i32 {
  let len = scratchLength;
  if (len > 1) {
    sortL(scratch, 0, len - 1);
    let kept = 0;
    for (let r = 0; r < len; ) {
      let q = r + 1;
      const x = getL(scratch, r);
      while (q < len && getL(scratch, q) == x) q++;
      if ((q - r) & 1) setL(scratch, kept++, x);
      r = q;
    }
    len = kept;
  }
  reserveStore(storeLength + len);
  memory.copy(storeP + ((<usize>storeLength) << 3), scratch, (<usize>len) << 3);
  storeLength += len;
  return closeColumn();
}

/** Sorts p[lo … hi] ascending (quicksort, insertion sort below 16 entries). */
function sortL(p: usize, lo: i32, hi: i32): void {
  while (hi - lo >= 16) {
    const mid = lo + ((hi - lo) >> 1);
    // median of three to p[mid]
    if (getL(p, mid) < getL(p, lo)) swapL(p, mid, lo);
    if (getL(p, hi) < getL(p, lo)) swapL(p, hi, lo);
    if (getL(p, hi) < getL(p, mid)) swapL(p, hi, mid);
    const pivot = getL(p, mid);
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (getL(p, i) < pivot) i++;
      while (getL(p, j) > pivot) j--;
      if (i <= j) {
        swapL(p, i, j);
        i++;
        j--;
      }
    }
    if (j - lo < hi - i) {
      sortL(p, lo, j);
      lo = i;
    } else {
      sortL(p, i, hi);
      hi = j;
    }
  }
  for (let k = lo + 1; k <= hi; k++) {
    const x = getL(p, k);
    let q = k - 1;
    while (q >= lo && getL(p, q) > x) {
      setL(p, q + 1, getL(p, q));
      q--;
    }
    setL(p, q + 1, x);
  }
}

// @ts-ignore: decorator
@inline function swapL(p: usize, a: i32, b: i32): void {
  const x = getL(p, a);
  setL(p, a, getL(p, b));
  setL(p, b, x);
}

// ---------------------------------------------------------------- pivots

// @ts-ignore: decorator
@inline function slot(key: i64): i32 {
  const lo = <i32>key;
  const hi = <i32>(key >>> 32);
  let h = (lo ^ (hi * 0x9e3779b1)) * 0x85ebca6b;
  h ^= <i32>(<u32>h >>> 15);
  h *= 0xc2b2ae35;
  h ^= <i32>(<u32>h >>> 13);
  return h & mapMask;
}

function mapGet(key: i64): i32 {
  let s = slot(key);
  while (true) {
    const k = getL(mapKeys, s);
    if (k == key) return getI(mapValues, s);
    if (k == -1) return -1;
    s = (s + 1) & mapMask;
  }
}

function mapSet(key: i64, value: i32): void {
  if ((mapCount + 1) * 2 > mapMask + 1) mapGrow();
  let s = slot(key);
  while (getL(mapKeys, s) != -1 && getL(mapKeys, s) != key) s = (s + 1) & mapMask;
  if (getL(mapKeys, s) == -1) mapCount++;
  setL(mapKeys, s, key);
  setI(mapValues, s, value);
}

function mapGrow(): void {
  const oldKeys = mapKeys;
  const oldValues = mapValues;
  const oldCap = mapMask + 1;
  const cap = oldCap * 2;
  mapKeys = alloc((<usize>cap) << 3);
  memory.fill(mapKeys, 0xff, (<usize>cap) << 3);
  mapValues = alloc((<usize>cap) << 2);
  mapMask = cap - 1;
  mapCount = 0;
  for (let s = 0; s < oldCap; s++) {
    const k = getL(oldKeys, s);
    if (k != -1) mapSet(k, getI(oldValues, s));
  }
}
