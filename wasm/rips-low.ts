// AssemblyScript, compiled to WebAssembly by `npm run kernel` (wasm/build.mjs) into
// src/homology/rips-kernel-bytes.ts. Not part of the TypeScript build: i32, f64, load and store are
// AssemblyScript's.
//
// Vietoris–Rips persistence in degrees 0–2 — the same algorithm, step for step, as ripsPersistence in
// src/homology/rips.ts (read the comments there and in edge-collapse.ts and rank-queue.ts): edges sorted by
// value (ties by decreasing condensed index), H0 by union-find with the elder rule, H1 by the cohomology
// reduction with apparent and emergent pairs, the cofacets of an edge enumerated from neighbour rows up to a
// cap that doubles; for degree 2 the edge collapse first, the triangles paired in degree 1 cleared, the
// degree-2 columns met through their last edges and reduced with the rank queue and per-triangle cursors.
// The diagrams are the same pairs in the same order. The engine exists because compiled WebAssembly is
// shared by every thread of a process, where each thread compiles JavaScript for itself (the warm-up that
// kept two threads from doubling the speed); it is also 1.6–2.3× faster.
//
// Memory: a bump allocator over the module's memory, reset at the start of each sample (`prepare`). Simplex
// numbers are i64.


// ------------------------------------------------------------------------------------------------ memory

let top: usize = 0;
// The largest block `grow` has left behind in this sample: later blocks that fit are cut from its start, so
// that the growing array stays the last block and keeps growing in place.
let holeStart: usize = 0;
let holeEnd: usize = 0;

/** A block of `size` bytes (sizes are 64-bit so that no product wraps: 4 GiB or more traps). */
function alloc(size: u64): usize {
  if (size >= 0x100000000) unreachable();
  const h = (holeStart + 15) & ~(<usize>15);
  if (<u64>h + size <= <u64>holeEnd) {
    holeStart = h + <usize>size;
    return h;
  }
  const p = (top + 15) & ~(<usize>15);
  const end = p + <usize>size;
  if (end < p) unreachable(); // beyond 4 GiB
  const pages = <i32>((end + 0xffff) >>> 16);
  const have = memory.size();
  if (pages > have && memory.grow(pages - have) < 0) unreachable();
  top = end;
  return p;
}

/**
 * Room for `newBytes` at p, keeping the first `oldBytes`: in place when p is the last block allocated (the
 * common case for the one array that grows during a long column), else a new block with the old contents;
 * the old block becomes the hole if it is the largest left behind (other blocks wait for the next sample).
 */
function grow(p: usize, oldBytes: u64, newBytes: u64): usize {
  if (newBytes >= 0x100000000) unreachable();
  if (p + <usize>oldBytes == top) {
    const end = p + <usize>newBytes;
    if (end < p) unreachable();
    const pages = <i32>((end + 0xffff) >>> 16);
    const have = memory.size();
    if (pages > have && memory.grow(pages - have) < 0) unreachable();
    top = end;
    return p;
  }
  const q = alloc(newBytes);
  memory.copy(q, p, <usize>oldBytes);
  if (oldBytes > <u64>(holeEnd - holeStart)) {
    holeStart = p;
    holeEnd = p + <usize>oldBytes;
  }
  return q;
}

function zeroed(bytes: u64): usize {
  const p = alloc(bytes);
  memory.fill(p, 0, <usize>bytes);
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
let births2: usize = 0;
let deaths2: usize = 0;
let count2: i32 = 0;
let badEdge: i32 = -1;

/** Starts a sample of n vertices: returns where its n(n−1)/2 edge values go (then n vertex values). */
export function prepare(n: i32): usize {
  // More than a 32-bit memory holds (the caller then uses the TypeScript engine): trap before any size wraps.
  if ((<u64>n * <u64>max<i32>(n, 1)) * 48 >= 0x100000000) unreachable();
  top = __heap_base;
  holeStart = 0;
  holeEnd = 0;
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
  return degree == 0 ? count0 : degree == 1 ? count1 : count2;
}
export function birthsOf(degree: i32): usize {
  return degree == 0 ? births0 : degree == 1 ? births1 : births2;
}
export function deathsOf(degree: i32): usize {
  return degree == 0 ? deaths0 : degree == 1 ? deaths1 : deaths2;
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
    setI(oldest, link(parent, size, ri, rj), iOlder ? oi : oj);
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
  count2 = 0;
  clearedP = 0;
  if (maxDegree == 0) return 0;

  if (maxDegree == 2) {
    degreeTwo(n, kept, low, high, rankSorted, levels);
    return 0;
  }
  // The rank table and the rows in 16-bit entries when ranks and vertices fit: half the memory read at
  // random (clouds of 300 points: 2–3% faster, measured).
  if (levelCount < 0xffff && n < 0xffff)
    degreeOne<u16>(n, kept, low, high, rankSorted, levels, levelCount, cycleLow, cycleHigh, cycleRank, cycles);
  else degreeOne<i32>(n, kept, low, high, rankSorted, levels, levelCount, cycleLow, cycleHigh, cycleRank, cycles);
  return 0;
}

/**
 * Degree 1 with rank-table and row entries of type R (u16 or i32): the dense symmetric table of ranks (all
 * bits set off the filtration for u16, 0x7f7f7f7f for i32 — above every rank either way), each vertex's
 * neighbours in filtration order (buildLists), then the reduction.
 */
function degreeOne<R>(
  n: i32,
  kept: i32,
  low: usize,
  high: usize,
  rankSorted: usize,
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
  for (let k = 0; k < kept; k++) {
    const i = getI(low, k);
    const j = getI(high, k);
    const r = getI(rankSorted, k);
    putR<R>(rankOf, i * n + j, r);
    putR<R>(rankOf, j * n + i, r);
  }
  buildLists<R>(n, low, high, rankSorted, kept);
  reduceEdges<R>(n, rankOf, levels, levelCount, listStart, listVertex, listRank, cycleLow, cycleHigh, cycleRank, cycles);
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

/** Joins the sets of the roots ri ≠ rj, the smaller under the larger; returns the new root. */
function link(parent: usize, size: usize, ri: i32, rj: i32): i32 {
  let root = ri;
  let child = rj;
  if (getI(size, ri) < getI(size, rj)) {
    root = rj;
    child = ri;
  }
  setI(parent, child, root);
  setI(size, root, getI(size, root) + getI(size, child));
  return root;
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
let c4P: usize = 0; // C(v, 4), i64
/** Degree 2 is computed: the triangles paired in degree 1 are marked in this bitset (0: none). */
let clearedP: usize = 0;
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
  binomials(n);
  const step = max<i32>(1, (levelCount + 63) / 64);
  topRank = levelCount - 1;
  births1 = alloc((<usize>max<i32>(count, 1)) << 3);
  deaths1 = alloc((<usize>max<i32>(count, 1)) << 3);
  count1 = 0;
  heapCapacity = 4096;
  heapRanks = alloc((<u64>heapCapacity) << 2);
  heapIndices = alloc((<u64>heapCapacity) << 3);
  scratchCapacity = 256;
  scratch = alloc((<u64>scratchCapacity) << 3);
  storeCapacity = 1 << 16;
  storeP = alloc((<u64>storeCapacity) << 3);
  startsCapacity = 1 << 12;
  startsP = alloc((<u64>startsCapacity) << 2);
  storeLength = 0;
  columnCount = 0;
  setI(startsP, 0, 0);
  mapInit(max<i32>(16, count >> 3));

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
      if (youngestEdge<R>(i, j, k, r)) {
        markCleared(t); // apparent pair
        continue;
      }
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
        markCleared(t);
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
      markCleared(pi);
      break;
    }
  }
}

// @ts-ignore: decorator
@inline function markCleared(t: i64): void {
  if (clearedP != 0) {
    const at = clearedP + <usize>(t >>> 3);
    store<u8>(at, load<u8>(at) | (<u8>1 << <u8>(t & 7)));
  }
}

/** The rows C(v, 2), C(v, 3), C(v, 4) for v = 0 … n, as i64. */
function binomials(n: i32): void {
  c2P = alloc((<usize>(n + 1)) << 3);
  c3P = alloc((<usize>(n + 1)) << 3);
  c4P = alloc((<usize>(n + 1)) << 3);
  for (let v = 0; v <= n; v++) {
    const w = <i64>v;
    setL(c2P, v, (w * (w - 1)) / 2);
    setL(c3P, v, (w * (w - 1) * (w - 2)) / 6);
    setL(c4P, v, (w * (w - 1) * (w - 2) * (w - 3)) / 24);
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
    const r = alloc((<u64>heapCapacity) << 3);
    memory.copy(r, heapRanks, (<usize>heapCapacity) << 2);
    const x = alloc((<u64>heapCapacity) << 4);
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
    scratch = grow(scratch, (<u64>scratchCapacity) << 3, (<u64>scratchCapacity) << 4);
    scratchCapacity *= 2;
  }
  setL(scratch, scratchLength++, x);
}

function reserveStore(atLeast: i32): void {
  if (atLeast <= storeCapacity) return;
  let c = storeCapacity * 2;
  if (c < atLeast) c = atLeast;
  storeP = grow(storeP, (<u64>storeCapacity) << 3, (<u64>c) << 3);
  storeCapacity = c;
}

function closeColumn(): i32 {
  const id = columnCount++;
  if (columnCount + 1 > startsCapacity) {
    startsP = grow(startsP, (<u64>startsCapacity) << 2, (<u64>startsCapacity) << 3);
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

/** An empty pivot map with room for `expected` keys at half load. */
function mapInit(expected: i32): void {
  let cap = 16;
  while (cap < expected * 2) cap *= 2;
  mapKeys = alloc((<u64>cap) << 3);
  memory.fill(mapKeys, 0xff, (<usize>cap) << 3); // −1: empty
  mapValues = alloc((<u64>cap) << 2);
  mapMask = cap - 1;
  mapCount = 0;
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
  mapKeys = alloc((<u64>cap) << 3);
  memory.fill(mapKeys, 0xff, (<usize>cap) << 3);
  mapValues = alloc((<u64>cap) << 2);
  mapMask = cap - 1;
  mapCount = 0;
  for (let s = 0; s < oldCap; s++) {
    const k = getL(oldKeys, s);
    if (k != -1) mapSet(k, getI(oldValues, s));
  }
}

// ------------------------------------------------------------------------------------------------ degree 2

// The edge collapse and the degree-2 reduction, as in edge-collapse.ts and rips.ts (read the comments
// there); edges removed by the collapse have rank NO_EDGE32 in the 32-bit table.
const NO_EDGE32: i32 = 0x7f7f7f7f;
const MAX_PASSES = 5;

// Lists of edges in filtration order (low[k] < high[k], rank[k]) with each vertex's neighbours in that order:
// row v is listVertex/listRank[listStart[v] … listStart[v + 1]). Written by buildLists and tableEdges.
let listLow: usize = 0;
let listHigh: usize = 0;
let listRankOfEdge: usize = 0;
let listCount: i32 = 0;
let listStart: usize = 0;
let listVertex: usize = 0;
let listRank: usize = 0;

/** Neighbour rows (entries of type R) of the edges low/high/ranks[0 … count) into the list globals. */
function buildLists<R>(n: i32, low: usize, high: usize, ranks: usize, count: i32): void {
  listLow = low;
  listHigh = high;
  listRankOfEdge = ranks;
  listCount = count;
  const start = zeroed((<usize>(n + 1)) << 2);
  for (let k = 0; k < count; k++) {
    const a = getI(low, k) + 1;
    const b = getI(high, k) + 1;
    setI(start, a, getI(start, a) + 1);
    setI(start, b, getI(start, b) + 1);
  }
  for (let v = 1; v <= n; v++) setI(start, v, getI(start, v) + getI(start, v - 1));
  const fill = alloc((<usize>n) << 2);
  memory.copy(fill, start, (<usize>n) << 2);
  const vertex = alloc(<usize>count * 2 * sizeof<R>());
  const rank = alloc(<usize>count * 2 * sizeof<R>());
  for (let k = 0; k < count; k++) {
    const i = getI(low, k);
    const j = getI(high, k);
    const r = getI(ranks, k);
    let p = getI(fill, i);
    setI(fill, i, p + 1);
    putR<R>(vertex, p, j);
    putR<R>(rank, p, r);
    p = getI(fill, j);
    setI(fill, j, p + 1);
    putR<R>(vertex, p, i);
    putR<R>(rank, p, r);
  }
  listStart = start;
  listVertex = vertex;
  listRank = rank;
}

/** The edges of the 32-bit table in filtration order (rank ascending, ties by decreasing condensed index), as lists. */
function tableEdges(n: i32, rankOf: usize): void {
  let top = 0;
  let count = 0;
  for (let j = 1; j < n; j++) {
    const row = j * n;
    for (let i = 0; i < j; i++) {
      const r = getI(rankOf, row + i);
      if (r == NO_EDGE32) continue;
      if (r > top) top = r;
      count++;
    }
  }
  const next = zeroed((<usize>(top + 2)) << 2);
  for (let j = 1; j < n; j++) {
    const row = j * n;
    for (let i = 0; i < j; i++) {
      const r = getI(rankOf, row + i);
      if (r != NO_EDGE32) setI(next, r + 1, getI(next, r + 1) + 1);
    }
  }
  for (let v = 1; v < top + 2; v++) setI(next, v, getI(next, v) + getI(next, v - 1));
  const low = alloc((<usize>count) << 2);
  const high = alloc((<usize>count) << 2);
  const ranks = alloc((<usize>count) << 2);
  for (let j = n - 1; j >= 1; j--) {
    const row = j * n;
    for (let i = j - 1; i >= 0; i--) {
      const r = getI(rankOf, row + i);
      if (r == NO_EDGE32) continue;
      const p = getI(next, r);
      setI(next, r, p + 1);
      setI(low, p, i);
      setI(high, p, j);
      setI(ranks, p, r);
    }
  }
  buildLists<i32>(n, low, high, ranks, count);
}

function degreeTwo(n: i32, kept: i32, low: usize, high: usize, rankSorted: usize, levels: usize): void {
  const cells = <usize>n * <usize>n;
  const rankOf32 = alloc(cells << 2);
  memory.fill(rankOf32, 0x7f, cells << 2);
  for (let k = 0; k < kept; k++) {
    const i = getI(low, k);
    const j = getI(high, k);
    const r = getI(rankSorted, k);
    setI(rankOf32, i * n + j, r);
    setI(rankOf32, j * n + i, r);
  }
  buildLists<i32>(n, low, high, rankSorted, kept);

  // The collapse, in passes; then one rank per edge (its position), levelOf mapping back.
  for (let pass = 0; pass < MAX_PASSES; pass++) {
    collapseEdges(n, rankOf32);
    tableEdges(n, rankOf32);
    if (collapseMoved * 20 < collapseKept) break;
  }
  const m = listCount;
  const levelsC = alloc((<usize>max<i32>(m, 1)) << 3);
  for (let k = 0; k < m; k++) {
    setF(levelsC, k, getF(levels, getI(listRankOfEdge, k)));
    setI(listRankOfEdge, k, k);
    setI(rankOf32, getI(listLow, k) * n + getI(listHigh, k), k);
    setI(rankOf32, getI(listHigh, k) * n + getI(listLow, k), k);
  }
  for (let z = 0; z < n; z++) {
    const row = z * n;
    const end = getI(listStart, z + 1);
    for (let p = getI(listStart, z); p < end; p++) setI(listRank, p, getI(rankOf32, row + getI(listVertex, p)));
  }

  // Degree-1 columns: the collapsed edges that close a cycle.
  const parent = alloc((<usize>n) << 2);
  const size = alloc((<usize>n) << 2);
  for (let v = 0; v < n; v++) {
    setI(parent, v, v);
    setI(size, v, 1);
  }
  const cycleLow = alloc((<usize>max<i32>(m, 1)) << 2);
  const cycleHigh = alloc((<usize>max<i32>(m, 1)) << 2);
  const cycleRank = alloc((<usize>max<i32>(m, 1)) << 2);
  let cycles = 0;
  for (let k = 0; k < m; k++) {
    const i = getI(listLow, k);
    const j = getI(listHigh, k);
    const ri = find(parent, i);
    const rj = find(parent, j);
    if (ri == rj) {
      setI(cycleLow, cycles, i);
      setI(cycleHigh, cycles, j);
      setI(cycleRank, cycles++, k);
      continue;
    }
    link(parent, size, ri, rj);
  }

  // Triangles paired in degree 1 are cleared from degree 2.
  const triangles = (<i64>n * <i64>(n - 1) * <i64>(n - 2)) / 6;
  const clearedBytes = <usize>((triangles + 7) >>> 3) + 8;
  clearedP = zeroed(clearedBytes);

  if (m < 0xffff && n < 0xffff) {
    const table = alloc(cells << 1);
    for (let c = 0; c < <i32>cells; c++) {
      const r = getI(rankOf32, c);
      store<u16>(table + ((<usize>c) << 1), r == NO_EDGE32 ? 0xffff : <u16>r);
    }
    const vertex = alloc((<usize>m) << 2);
    const rank = alloc((<usize>m) << 2);
    for (let p = 0; p < 2 * m; p++) {
      store<u16>(vertex + ((<usize>p) << 1), <u16>getI(listVertex, p));
      store<u16>(rank + ((<usize>p) << 1), <u16>getI(listRank, p));
    }
    reduceEdges<u16>(n, table, levelsC, m, listStart, vertex, rank, cycleLow, cycleHigh, cycleRank, cycles);
    reduceTriangles<u16>(n, m, levelsC);
  } else {
    reduceEdges<i32>(n, rankOf32, levelsC, m, listStart, listVertex, listRank, cycleLow, cycleHigh, cycleRank, cycles);
    reduceTriangles<i32>(n, m, levelsC);
  }
}

// ---------------------------------------------------------------- the collapse

let collapseKept: i32 = 0;
let collapseMoved: i32 = 0;
let words: i32 = 0;
let waitingP: usize = 0;
let commonP: usize = 0;
let candidatesP: usize = 0;
let collapseRankOf: usize = 0;

// @ts-ignore: decorator
@inline function setBit(bits: usize, x: i32): void {
  const at = bits + ((<usize>(x >>> 5)) << 2);
  store<u32>(at, load<u32>(at) | (<u32>1 << <u32>(x & 31)));
}

/** One collapse pass over the lists, in place on the table (see collapseEdges in edge-collapse.ts). */
function collapseEdges(n: i32, rankOf: usize): void {
  const low = listLow;
  const high = listHigh;
  const rank = listRankOfEdge;
  const start = listStart;
  const count = listCount;
  words = (n + 31) >>> 5;
  collapseRankOf = rankOf;
  const waiting = zeroed(<usize>n * <usize>words * 4);
  for (let k = 0; k < count; k++) {
    setBit(waiting + <usize>getI(low, k) * <usize>words * 4, getI(high, k));
    setBit(waiting + <usize>getI(high, k) * <usize>words * 4, getI(low, k));
  }
  waitingP = waiting;
  const rowCount = zeroed((<usize>n) << 2);
  const total = getI(start, n);
  const laterRank = alloc((<usize>max<i32>(total, 1)) << 2);
  const laterVertex = alloc((<usize>max<i32>(total, 1)) << 2);
  const common = alloc((<usize>words) << 2);
  commonP = common;
  candidatesP = alloc((<usize>words) << 2);
  let kept = 0;
  let moved = 0;
  for (let k = count - 1; k >= 0; k--) {
    const u = getI(low, k);
    const v = getI(high, k);
    const r = getI(rank, k);
    const rowU = u * n;
    const rowV = v * n;
    const baseU = waiting + <usize>u * <usize>words * 4;
    const baseV = waiting + <usize>v * <usize>words * 4;
    const firstU = getI(start, u);
    const firstV = getI(start, v);
    let pu = firstU + getI(rowCount, u) - 1;
    let pv = firstV + getI(rowCount, v) - 1;
    for (let q = 0; q < words; q++)
      store<u32>(common + ((<usize>q) << 2), load<u32>(baseU + ((<usize>q) << 2)) & load<u32>(baseV + ((<usize>q) << 2)));
    while (pu >= firstU && getI(laterRank, pu) <= r) {
      const x = getI(laterVertex, pu--);
      if (getI(rankOf, rowV + x) <= r) setBit(common, x);
    }
    while (pv >= firstV && getI(laterRank, pv) <= r) {
      const x = getI(laterVertex, pv--);
      if (getI(rankOf, rowU + x) <= r) setBit(common, x);
    }
    let s = r;
    let w = dominator(n, s);
    if (w >= 0) {
      s = NO_EDGE32;
      let rowW = w * n;
      while (pu >= firstU || pv >= firstV) {
        let x: i32;
        let a: i32;
        if (pv < firstV || (pu >= firstU && getI(laterRank, pu) <= getI(laterRank, pv))) {
          x = getI(laterVertex, pu);
          a = getI(laterRank, pu--);
          if (getI(rankOf, rowV + x) > a) continue;
        } else {
          x = getI(laterVertex, pv);
          a = getI(laterRank, pv--);
          if (getI(rankOf, rowU + x) >= a) continue;
        }
        setBit(common, x);
        if (getI(rankOf, rowW + x) <= a) continue;
        while (pu >= firstU && getI(laterRank, pu) == a) {
          const y = getI(laterVertex, pu--);
          if (getI(rankOf, rowV + y) <= a) setBit(common, y);
        }
        while (pv >= firstV && getI(laterRank, pv) == a) {
          const y = getI(laterVertex, pv--);
          if (getI(rankOf, rowU + y) < a) setBit(common, y);
        }
        w = dominator(n, a);
        if (w < 0) {
          s = a;
          break;
        }
        rowW = w * n;
      }
    }
    if (s != r) moved++;
    setI(rankOf, rowU + v, s);
    setI(rankOf, rowV + u, s);
    if (s != NO_EDGE32) {
      kept++;
      const cu = getI(rowCount, u);
      insertSorted(laterRank, laterVertex, firstU, cu, s, v);
      setI(rowCount, u, cu + 1);
      const cv = getI(rowCount, v);
      insertSorted(laterRank, laterVertex, firstV, cv, s, u);
      setI(rowCount, v, cv + 1);
    }
    // clear the waiting edge
    let at = baseU + ((<usize>(v >>> 5)) << 2);
    store<u32>(at, load<u32>(at) & ~(<u32>1 << <u32>(v & 31)));
    at = baseV + ((<usize>(u >>> 5)) << 2);
    store<u32>(at, load<u32>(at) & ~(<u32>1 << <u32>(u & 31)));
  }
  collapseKept = kept;
  collapseMoved = moved;
}

function insertSorted(ranks: usize, vertices: usize, from: i32, length: i32, rank: i32, vertex: i32): void {
  const end = from + length;
  let lo = from;
  let hi = end;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (getI(ranks, mid) > rank) lo = mid + 1;
    else hi = mid;
  }
  if (lo < end) {
    memory.copy(ranks + ((<usize>(lo + 1)) << 2), ranks + ((<usize>lo) << 2), (<usize>(end - lo)) << 2);
    memory.copy(vertices + ((<usize>(lo + 1)) << 2), vertices + ((<usize>lo) << 2), (<usize>(end - lo)) << 2);
  }
  setI(ranks, lo, rank);
  setI(vertices, lo, vertex);
}

/** A member of `common` joined by rank ≤ s to every other member, or −1 (see dominator in edge-collapse.ts). */
function dominator(n: i32, s: i32): i32 {
  const candidates = candidatesP;
  memory.copy(candidates, commonP, (<usize>words) << 2);
  let q = words - 1;
  while (q >= 0) {
    const bits = load<u32>(candidates + ((<usize>q) << 2));
    if (bits == 0) {
      q--;
      continue;
    }
    const c = (q << 5) + 31 - <i32>clz<u32>(bits);
    const x = firstMiss(n, c, s);
    if (x < 0) return c;
    store<u32>(candidates + ((<usize>q) << 2), bits & ~(<u32>1 << <u32>(c & 31)));
    const base = waitingP + <usize>x * <usize>words * 4;
    const xAt = candidates + ((<usize>(x >>> 5)) << 2);
    const keepX = load<u32>(xAt) & (<u32>1 << <u32>(x & 31));
    for (let p = 0; p <= q; p++) {
      const at = candidates + ((<usize>p) << 2);
      store<u32>(at, load<u32>(at) & load<u32>(base + ((<usize>p) << 2)));
    }
    store<u32>(xAt, load<u32>(xAt) | keepX);
  }
  return -1;
}

/** The first member of `common` other than w that w is not joined to by rank ≤ s, or −1. */
function firstMiss(n: i32, w: i32, s: i32): i32 {
  const base = waitingP + <usize>w * <usize>words * 4;
  const row = w * n;
  const own = w >>> 5;
  const ownBit = <u32>1 << <u32>(w & 31);
  for (let q = 0; q < words; q++) {
    let miss = load<u32>(commonP + ((<usize>q) << 2)) & ~load<u32>(base + ((<usize>q) << 2));
    if (q == own) miss &= ~ownBit;
    while (miss != 0) {
      const lowest = miss & (~miss + 1);
      miss ^= lowest;
      const x = (q << 5) + 31 - <i32>clz<u32>(lowest);
      if (getI(collapseRankOf, row + x) > s) return x;
    }
  }
  return -1;
}

// ---------------------------------------------------------------- the degree-2 reduction

let adjacencyP: usize = 0;
let step2: i32 = 1;
let floorRank: i32 = -1;
let floorIndex: i64 = 0;
// Beside each triangle of the scratch column: its vertices a > b > c, its rank, its cursors in the rows of a, b, c.
let triA: usize = 0;
let triB: usize = 0;
let triC: usize = 0;
let triRank: usize = 0;
let curA: usize = 0;
let curB: usize = 0;
let curC: usize = 0;
let vA: i32 = 0;
let vB: i32 = 0;
let vC: i32 = 0;
let vD: i32 = 0;

/** Decodes the triangle t into vA > vB > vC. */
function triangleVertices(t: i64): void {
  const a = maxVertex(c3P, t, N - 1);
  const rest = t - getL(c3P, a);
  const b = maxVertex(c2P, rest, a - 1);
  vA = a;
  vB = b;
  vC = <i32>(rest - getL(c2P, b));
}

/** Decodes the tetrahedron q into vA > vB > vC > vD. */
function tetrahedronVertices(q: i64): void {
  const a = maxVertex(c4P, q, N - 1);
  let rest = q - getL(c4P, a);
  const b = maxVertex(c3P, rest, a - 1);
  rest -= getL(c3P, b);
  const c = maxVertex(c2P, rest, b - 1);
  vA = a;
  vB = b;
  vC = c;
  vD = <i32>(rest - getL(c2P, c));
}

// @ts-ignore: decorator
@inline function fourthVertexNumber(a: i32, b: i32, c: i32, k: i32): i64 {
  return k > a
    ? getL(c4P, k) + getL(c3P, a) + getL(c2P, b) + <i64>c
    : k > b
      ? getL(c4P, a) + getL(c3P, k) + getL(c2P, b) + <i64>c
      : k > c
        ? getL(c4P, a) + getL(c3P, b) + getL(c2P, k) + <i64>c
        : getL(c4P, a) + getL(c3P, b) + getL(c2P, c) + <i64>k;
}

/** The oldest cofacet of the triangle a > b > c of rank r as a tetrahedron number, or −1; sets `found`. */
function oldestOfTriangle<R>(a: i32, b: i32, c: i32, r: i32): i64 {
  const rowA = a * N;
  const rowB = b * N;
  const rowC = c * N;
  const wa = adjacencyP + <usize>a * <usize>words * 4;
  const wb = adjacencyP + <usize>b * <usize>words * 4;
  const wc = adjacencyP + <usize>c * <usize>words * 4;
  for (let q = words - 1; q >= 0; q--) {
    const o = (<usize>q) << 2;
    let bits = load<u32>(wa + o) & load<u32>(wb + o) & load<u32>(wc + o);
    while (bits != 0) {
      const bit = 31 - <i32>clz<u32>(bits);
      bits ^= <u32>1 << <u32>bit;
      const k = (q << 5) + bit;
      if (getR<R>(rankOfP, rowA + k) > r || getR<R>(rankOfP, rowB + k) > r || getR<R>(rankOfP, rowC + k) > r) continue;
      found = k;
      return fourthVertexNumber(a, b, c, k);
    }
  }
  return -1;
}

/** Whether the tetrahedron w > x > y > z (number q, rank r) is in an apparent pair; its triangle goes to `facet`. */
function apparentTriangle<R>(w: i32, x: i32, y: i32, z: i32, r: i32, q: i64): bool {
  const wx = getR<R>(rankOfP, w * N + x);
  const wy = getR<R>(rankOfP, w * N + y);
  const wz = getR<R>(rankOfP, w * N + z);
  const xy = getR<R>(rankOfP, x * N + y);
  const xz = getR<R>(rankOfP, x * N + z);
  const yz = getR<R>(rankOfP, y * N + z);
  let a: i32;
  let b: i32;
  let c: i32;
  if (max<i32>(max<i32>(xy, xz), yz) == r) {
    a = x;
    b = y;
    c = z;
  } else if (max<i32>(max<i32>(wy, wz), yz) == r) {
    a = w;
    b = y;
    c = z;
  } else if (max<i32>(max<i32>(wx, wz), xz) == r) {
    a = w;
    b = x;
    c = z;
  } else {
    a = w;
    b = x;
    c = y;
  }
  if (oldestOfTriangle<R>(a, b, c, r) != q) return false;
  facet = getL(c3P, a) + getL(c2P, b) + <i64>c;
  return true;
}

// Columns listed by triangleColumns.
let columnsP: usize = 0;
let columnRanksP: usize = 0;
let columnTotal: i32 = 0;

/** The degree-2 columns in reverse filtration order (see triangleColumns in rips.ts). */
function triangleColumns<R>(n: i32, m: i32): void {
  const cleared = clearedP;
  const low = listLow;
  const high = listHigh;
  const ranks = listRankOfEdge;
  const rowBytes = <usize>words * 4;
  const before = zeroed(<usize>n * rowBytes);
  const upTo = zeroed(<usize>n * rowBytes);
  const pair = alloc(rowBytes);
  let capacity = max<i32>(1 << 12, m);
  let found = alloc((<u64>capacity) << 3);
  let foundRanks = alloc((<u64>capacity) << 2);
  let count = 0;
  let added = 0;
  for (let e = 0; e < m; e++) {
    const p = getI(low, e);
    const q = getI(high, e);
    const r = getI(ranks, e);
    for (; added < m && getI(ranks, added) <= r; added++) {
      setBit(upTo + <usize>getI(low, added) * rowBytes, getI(high, added));
      setBit(upTo + <usize>getI(high, added) * rowBytes, getI(low, added));
    }
    const groupStart = count;
    const wp = <usize>p * rowBytes;
    const wq = <usize>q * rowBytes;
    const rowP = p * n;
    const rowQ = q * n;
    for (let w = 0; w < words; w++) {
      const o = (<usize>w) << 2;
      store<u32>(pair + o, load<u32>(upTo + wp + o) & load<u32>(upTo + wq + o));
    }
    for (let w = 0; w < words; w++) {
      const o = (<usize>w) << 2;
      let bits = load<u32>(before + wp + o) & load<u32>(before + wq + o);
      while (bits != 0) {
        const lowest = bits & (~bits + 1);
        bits ^= lowest;
        const x = (w << 5) + 31 - <i32>clz<u32>(lowest);
        const t =
          x > q
            ? getL(c3P, x) + getL(c2P, q) + <i64>p
            : x > p
              ? getL(c3P, q) + getL(c2P, x) + <i64>p
              : getL(c3P, q) + getL(c2P, p) + <i64>x;
        let k = -1;
        const wx = upTo + <usize>x * rowBytes;
        for (let z = words - 1; z >= 0; z--) {
          const oz = (<usize>z) << 2;
          const both = load<u32>(pair + oz) & load<u32>(wx + oz);
          if (both != 0) {
            k = (z << 5) + 31 - <i32>clz<u32>(both);
            break;
          }
        }
        if (
          k > x &&
          (k > q ||
            (getR<R>(rankOfP, rowP + x) != r &&
              getR<R>(rankOfP, rowP + k) != r &&
              getR<R>(rankOfP, x * n + k) != r &&
              (k > p || (getR<R>(rankOfP, rowQ + x) != r && getR<R>(rankOfP, rowQ + k) != r))))
        )
          continue;
        if ((load<u8>(cleared + <usize>(t >>> 3)) & (<u8>1 << <u8>(t & 7))) != 0) continue;
        if (count == capacity) {
          const f2 = alloc((<u64>capacity) << 4);
          memory.copy(f2, found, (<usize>capacity) << 3);
          found = f2;
          const r2 = alloc((<u64>capacity) << 3);
          memory.copy(r2, foundRanks, (<usize>capacity) << 2);
          foundRanks = r2;
          capacity *= 2;
        }
        setL(found, count, t);
        setI(foundRanks, count++, r);
      }
    }
    if (groupStart > 0 && count > groupStart && getI(foundRanks, groupStart - 1) == r) {
      let from = groupStart - 1;
      while (from > 0 && getI(foundRanks, from - 1) == r) from--;
      sortL(found, from, count - 1);
    }
    setBit(before + wp, q);
    setBit(before + wq, p);
  }
  // The runs of equal rank in reverse order, each kept in order.
  columnsP = alloc((<usize>max<i32>(count, 1)) << 3);
  columnRanksP = alloc((<usize>max<i32>(count, 1)) << 2);
  columnTotal = count;
  let out = 0;
  for (let end = count; end > 0; ) {
    let from = end - 1;
    while (from > 0 && getI(foundRanks, from - 1) == getI(foundRanks, end - 1)) from--;
    for (let i = from; i < end; i++) {
      setL(columnsP, out, getL(found, i));
      setI(columnRanksP, out++, getI(foundRanks, i));
    }
    end = from;
  }
}

function reduceTriangles<R>(n: i32, m: i32, levels: usize): void {
  words = (n + 31) >>> 5;
  const rowBytes = <usize>words * 4;
  adjacencyP = zeroed(<usize>n * rowBytes);
  for (let k = 0; k < m; k++) {
    setBit(adjacencyP + <usize>getI(listLow, k) * rowBytes, getI(listHigh, k));
    setBit(adjacencyP + <usize>getI(listHigh, k) * rowBytes, getI(listLow, k));
  }
  queueInit(m);
  step2 = max<i32>(1, (m + 63) / 64);
  topRank = m - 1;
  triangleColumns<R>(n, m);
  const columnCount = columnTotal;
  births2 = alloc((<usize>max<i32>(columnCount, 1)) << 3);
  deaths2 = alloc((<usize>max<i32>(columnCount, 1)) << 3);
  count2 = 0;
  storeLength = 0;
  columnCount_reset();
  mapInit(max<i32>(16, columnCount));
  triA = alloc((<u64>scratchCapacity) << 2);
  triB = alloc((<u64>scratchCapacity) << 2);
  triC = alloc((<u64>scratchCapacity) << 2);
  triRank = alloc((<u64>scratchCapacity) << 2);
  curA = alloc((<u64>scratchCapacity) << 2);
  curB = alloc((<u64>scratchCapacity) << 2);
  curC = alloc((<u64>scratchCapacity) << 2);
  let previousRank = -1;
  for (let col = 0; col < columnCount; col++) {
    const t = getL(columnsP, col);
    const r = getI(columnRanksP, col);
    triangleVertices(t);
    const a = vA;
    const b = vB;
    const c = vC;
    const tied = r == previousRank;
    previousRank = r;
    const q = oldestOfTriangle<R>(a, b, c, r);
    if (q >= 0) {
      sort4(a, b, c, found);
      if (!(tied && mapGet(q) >= 0) && !apparentTriangle<R>(vA, vB, vC, vD, r, q)) {
        mapSet(q, storeColumn1(t)); // emergent pair
        continue;
      }
    }
    queueClear(r);
    scratchLength = 0;
    cap = min<i32>(topRank, r + step2);
    floorRank = -1;
    insertTriangle<R>(t, a, b, c, r);
    while (true) {
      if (!queuePop()) {
        if (cap >= topRank) {
          setF(births2, count2, getF(levels, r));
          setF(deaths2, count2, Infinity);
          count2++;
          break;
        }
        cap = min<i32>(topRank, cap + step2);
        for (let s = 0; s < scratchLength; s++) advanceCursors<R>(s, cap);
        continue;
      }
      const pr = pivotRank;
      const pi = pivotIndex;
      floorRank = pr;
      floorIndex = pi;
      const owner = mapGet(pi);
      if (owner >= 0) {
        const end = getI(startsP, owner + 1);
        for (let s = getI(startsP, owner); s < end; s++) addTriangle<R>(getL(storeP, s));
        continue;
      }
      tetrahedronVertices(pi);
      if (apparentTriangle<R>(vA, vB, vC, vD, pr, pi)) {
        addTriangle<R>(facet);
        continue;
      }
      const death = getF(levels, pr);
      if (death > getF(levels, r)) {
        setF(births2, count2, getF(levels, r));
        setF(deaths2, count2, death);
        count2++;
      }
      mapSet(pi, storeScratch());
      break;
    }
  }
}

function columnCount_reset(): void {
  columnCount = 0;
  setI(startsP, 0, 0);
}

/** a > b > c and k in decreasing order into vA … vD. */
function sort4(a: i32, b: i32, c: i32, k: i32): void {
  if (k > a) {
    vA = k;
    vB = a;
    vC = b;
    vD = c;
  } else if (k > b) {
    vA = a;
    vB = k;
    vC = b;
    vD = c;
  } else if (k > c) {
    vA = a;
    vB = b;
    vC = k;
    vD = c;
  } else {
    vA = a;
    vB = b;
    vC = c;
    vD = k;
  }
}

function addTriangle<R>(f: i64): void {
  triangleVertices(f);
  const a = vA;
  const b = vB;
  const c = vC;
  let r = getR<R>(rankOfP, a * N + b);
  const ac = getR<R>(rankOfP, a * N + c);
  const bc = getR<R>(rankOfP, b * N + c);
  if (ac > r) r = ac;
  if (bc > r) r = bc;
  insertTriangle<R>(f, a, b, c, r);
}

/** The first position in [from, to) of a row whose rank is ≥ r (ranks ascend along a row), or `to`. */
function firstAtLeast<R>(from: i32, to: i32, r: i32): i32 {
  let lo = from;
  let hi = to;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (getR<R>(rowRankP, mid) < r) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

function pushTriangle(t: i64, a: i32, b: i32, c: i32, r: i32): i32 {
  if (scratchLength == scratchCapacity) {
    const old = scratchCapacity;
    const grownScratch = alloc((<u64>old) << 4);
    memory.copy(grownScratch, scratch, (<usize>old) << 3);
    scratch = grownScratch;
    triA = grownI(triA, old);
    triB = grownI(triB, old);
    triC = grownI(triC, old);
    triRank = grownI(triRank, old);
    curA = grownI(curA, old);
    curB = grownI(curB, old);
    curC = grownI(curC, old);
    scratchCapacity = old * 2;
  }
  const s = scratchLength++;
  setL(scratch, s, t);
  setI(triA, s, a);
  setI(triB, s, b);
  setI(triC, s, c);
  setI(triRank, s, r);
  return s;
}

function grownI(p: usize, length: i32): usize {
  const q = alloc((<u64>length) << 3);
  memory.copy(q, p, (<usize>length) << 2);
  return q;
}

function insertTriangle<R>(t: i64, a: i32, b: i32, c: i32, r: i32): void {
  const s = pushTriangle(t, a, b, c, r);
  const startA = getI(startP, a);
  const startB = getI(startP, b);
  const startC = getI(startP, c);
  const endA = firstAtLeast<R>(startA, getI(startP, a + 1), r + 1);
  const endB = firstAtLeast<R>(startB, getI(startP, b + 1), r + 1);
  const endC = firstAtLeast<R>(startC, getI(startP, c + 1), r + 1);
  if (r >= floorRank) {
    let x = a;
    let from = startA;
    let to = endA;
    if (endB - startB < to - from) {
      x = b;
      from = startB;
      to = endB;
    }
    if (endC - startC < to - from) {
      x = c;
      from = startC;
      to = endC;
    }
    const y = x == a ? b : a;
    const z = x == c ? b : c;
    const rowY = y * N;
    const rowZ = z * N;
    for (let p = from; p < to; p++) {
      const k = getR<R>(rowVertexP, p);
      if (getR<R>(rankOfP, rowY + k) > r || getR<R>(rankOfP, rowZ + k) > r) continue;
      const index = fourthVertexNumber(a, b, c, k);
      if (r == floorRank && index >= floorIndex) continue;
      queuePush(r, index);
    }
  }
  const least = floorRank > r ? floorRank : r + 1;
  setI(curA, s, least > r + 1 ? firstAtLeast<R>(endA, getI(startP, a + 1), least) : endA);
  setI(curB, s, least > r + 1 ? firstAtLeast<R>(endB, getI(startP, b + 1), least) : endB);
  setI(curC, s, least > r + 1 ? firstAtLeast<R>(endC, getI(startP, c + 1), least) : endC);
  advanceCursors<R>(s, cap);
}

function advanceCursors<R>(s: i32, hi: i32): void {
  const a = getI(triA, s);
  const b = getI(triB, s);
  const c = getI(triC, s);
  setI(curA, s, pushRow<R>(a, getI(curA, s), hi, b * N, 0, c * N, 0, a, b, c));
  setI(curB, s, pushRow<R>(b, getI(curB, s), hi, a * N, 1, c * N, 0, a, b, c));
  setI(curC, s, pushRow<R>(c, getI(curC, s), hi, a * N, 1, b * N, 1, a, b, c));
}

function pushRow<R>(
  x: i32,
  p: i32,
  hi: i32,
  rowY: i32,
  tieY: i32,
  rowZ: i32,
  tieZ: i32,
  a: i32,
  b: i32,
  c: i32,
): i32 {
  const end = getI(startP, x + 1);
  for (; p < end; p++) {
    const rk = getR<R>(rowRankP, p);
    if (rk > hi) break;
    const k = getR<R>(rowVertexP, p);
    if (getR<R>(rankOfP, rowY + k) > rk - tieY || getR<R>(rankOfP, rowZ + k) > rk - tieZ) continue;
    const index = fourthVertexNumber(a, b, c, k);
    if (rk == floorRank && index >= floorIndex) continue;
    queuePush(rk, index);
  }
  return p;
}

// ---------------------------------------------------------------- the rank queue (see rank-queue.ts)

let qHead: usize = 0;
let qStamp: usize = 0;
let qEpoch: i32 = 0;
// Entries of 12 bytes in one block (so that it grows in place): the simplex number (i64) and the link to the
// previous entry of the same rank (i32).
let qEntries: usize = 0;
let qLength: i32 = 0;
let qCapacity: i32 = 0;
let qCurrent: i32 = 0;
let qHighest: i32 = -1;
let qRankCount: i32 = 0;
let qRun: usize = 0;
let qRunLength: i32 = 0;
let qRunCapacity: i32 = 0;
let qLate: usize = 0;
let qLateSize: i32 = 0;
let qLateCapacity: i32 = 0;
let qMerged: bool = false;

function queueInit(rankCount: i32): void {
  qRankCount = rankCount;
  qHead = alloc((<usize>max<i32>(rankCount, 1)) << 2);
  qStamp = zeroed((<usize>max<i32>(rankCount, 1)) << 2);
  qEpoch = 0;
  qCapacity = 1024;
  qEntries = alloc(<u64>qCapacity * 12);
  qRunCapacity = 256;
  qRun = alloc((<u64>qRunCapacity) << 3);
  qLateCapacity = 256;
  qLate = alloc((<u64>qLateCapacity) << 3);
}

function queueClear(lowest: i32): void {
  qEpoch++;
  qLength = 0;
  qCurrent = lowest;
  qHighest = lowest - 1;
  qRunLength = 0;
  qLateSize = 0;
  qMerged = false;
}

function queuePush(rank: i32, index: i64): void {
  if (rank == qCurrent && qMerged) {
    latePush(index);
    return;
  }
  if (qLength == qCapacity) {
    qEntries = grow(qEntries, <u64>qCapacity * 12, <u64>qCapacity * 24);
    qCapacity *= 2;
  }
  const e = qLength++;
  const at = qEntries + <usize>e * 12;
  store<i64>(at, index);
  if (getI(qStamp, rank) == qEpoch) store<i32>(at + 8, getI(qHead, rank));
  else {
    setI(qStamp, rank, qEpoch);
    store<i32>(at + 8, -1);
  }
  setI(qHead, rank, e);
  if (rank > qHighest) qHighest = rank;
}

/** The first entry of odd multiplicity, removed, into pivotRank/pivotIndex; false when the column is zero. */
function queuePop(): bool {
  while (true) {
    if (!qMerged) {
      const rank = qCurrent;
      if (rank < qRankCount && getI(qStamp, rank) == qEpoch) mergeList(rank);
      qMerged = true;
    }
    while (qRunLength > 0 || qLateSize > 0) {
      const fromRun: i64 = qRunLength > 0 ? getL(qRun, qRunLength - 1) : -1;
      const fromLate: i64 = qLateSize > 0 ? getL(qLate, 0) : -1;
      const index = fromRun > fromLate ? fromRun : fromLate;
      let multiplicity = 0;
      if (fromRun == index) {
        qRunLength--;
        multiplicity++;
      }
      while (qLateSize > 0 && getL(qLate, 0) == index) {
        latePop();
        multiplicity++;
      }
      if (multiplicity & 1) {
        pivotRank = qCurrent;
        pivotIndex = index;
        return true;
      }
    }
    if (qCurrent >= qHighest) return false;
    qCurrent++;
    qMerged = false;
  }
}

function mergeList(rank: i32): void {
  let count = 0;
  for (let e = getI(qHead, rank); e >= 0; e = load<i32>(qEntries + <usize>e * 12 + 8)) count++;
  if (qRunCapacity < count) {
    qRunCapacity = max<i32>(count, qRunCapacity * 2);
    qRun = alloc((<u64>qRunCapacity) << 3);
  }
  let w = 0;
  for (let e = getI(qHead, rank); e >= 0; e = load<i32>(qEntries + <usize>e * 12 + 8))
    setL(qRun, w++, load<i64>(qEntries + <usize>e * 12));
  if (w > 1) sortL(qRun, 0, w - 1);
  let kept = 0;
  for (let r = 0; r < w; ) {
    let q = r + 1;
    const x = getL(qRun, r);
    while (q < w && getL(qRun, q) == x) q++;
    if ((q - r) & 1) setL(qRun, kept++, x);
    r = q;
  }
  qRunLength = kept;
}

function latePush(index: i64): void {
  if (qLateSize == qLateCapacity) {
    qLate = grow(qLate, (<u64>qLateCapacity) << 3, (<u64>qLateCapacity) << 4);
    qLateCapacity *= 2;
  }
  let i = qLateSize++;
  while (i > 0) {
    const parent = (i - 1) >> 1;
    if (getL(qLate, parent) >= index) break;
    setL(qLate, i, getL(qLate, parent));
    i = parent;
  }
  setL(qLate, i, index);
}

function latePop(): void {
  const size = --qLateSize;
  if (size == 0) return;
  const index = getL(qLate, size);
  let i = 0;
  while (true) {
    let child = 2 * i + 1;
    if (child >= size) break;
    if (child + 1 < size && getL(qLate, child + 1) > getL(qLate, child)) child++;
    if (index >= getL(qLate, child)) break;
    setL(qLate, i, getL(qLate, child));
    i = child;
  }
  setL(qLate, i, index);
}
