/**
 * A hash map from simplex index (a double below 2^53) to a column number (a non-negative Int32), on typed
 * arrays with open addressing and linear probing. Used for the pivots of the reduction: which column owns a
 * given cofacet as its pivot.
 */
const EMPTY = -1;

export class PivotMap {
  private keys: Float64Array;
  private values: Int32Array;
  private mask: number;
  count = 0;

  constructor(expected = 1024) {
    let cap = 16;
    while (cap < expected * 2) cap *= 2;
    this.keys = new Float64Array(cap).fill(EMPTY);
    this.values = new Int32Array(cap);
    this.mask = cap - 1;
  }

  private slot(key: number): number {
    const lo = key >>> 0;
    const hi = (key / 4294967296) >>> 0;
    let h = Math.imul(lo ^ Math.imul(hi, 0x9e3779b1), 0x85ebca6b);
    h ^= h >>> 15;
    h = Math.imul(h, 0xc2b2ae35);
    h ^= h >>> 13;
    return h & this.mask;
  }

  /** The column stored for `key`, or −1. */
  get(key: number): number {
    const keys = this.keys;
    let s = this.slot(key);
    // invariant: every slot between the home slot of `key` and s is occupied by another key
    while (true) {
      const k = keys[s];
      if (k === key) return this.values[s];
      if (k === EMPTY) return -1;
      s = (s + 1) & this.mask;
    }
  }

  has(key: number): boolean {
    return this.get(key) >= 0;
  }

  /** Stores `value` for a key not yet present. */
  set(key: number, value: number): void {
    if ((this.count + 1) * 2 > this.keys.length) this.grow();
    const keys = this.keys;
    let s = this.slot(key);
    // invariant: as in get; stops at the key itself or the first empty slot
    while (keys[s] !== EMPTY && keys[s] !== key) s = (s + 1) & this.mask;
    if (keys[s] === EMPTY) this.count++;
    keys[s] = key;
    this.values[s] = value;
  }

  /** Calls `visit(key)` for every stored key (order unspecified). */
  forEachKey(visit: (key: number) => void): void {
    const keys = this.keys;
    for (let s = 0; s < keys.length; s++) if (keys[s] !== EMPTY) visit(keys[s]);
  }

  private grow(): void {
    const oldKeys = this.keys;
    const oldValues = this.values;
    const cap = oldKeys.length * 2;
    this.keys = new Float64Array(cap).fill(EMPTY);
    this.values = new Int32Array(cap);
    this.mask = cap - 1;
    this.count = 0;
    for (let s = 0; s < oldKeys.length; s++) if (oldKeys[s] !== EMPTY) this.set(oldKeys[s], oldValues[s]);
  }
}

/**
 * The working column of a reduction: a multiset of cofacet entries (rank, index) over Z/2, from which the
 * pivot — smallest rank, ties to the largest index, odd multiplicity — is taken.
 *
 * Two levels: entries of rank ≤ `bound` live in a binary min-heap; larger ones are appended, unsorted, to
 * one of BUCKETS rank ranges of `step` ranks each above `base` (the last range is open), since most of them
 * are never reached before the column finds its pivot. When the heap runs dry the next non-empty range
 * moves into the heap. Invariant: every entry of rank ≤ bound is in the heap, every other entry in the
 * bucket of its range.
 */
const BUCKETS = 64;
const LAST = BUCKETS - 1;

export class CofacetHeap {
  ranks: Int32Array;
  indices: Float64Array;
  size = 0;
  private readonly bucketRanks: Int32Array[] = [];
  private readonly bucketIndices: Float64Array[] = [];
  private readonly bucketSizes = new Int32Array(BUCKETS);
  private base = 0;
  private current = 0;
  private bound = 0x7ffffffe;
  private step = 1;
  private shift = 0;
  /**
   * A range moved out of its bucket is sorted once into this run (keys encode rank and index, see
   * sortRange), with repeated entries already cancelled; entries pushed later go to the heap, and the pivot
   * is the first of the two.
   */
  private run = new Float64Array(1024);
  private runPosition = 0;
  private runLength = 0;
  private runLow = 0;
  /** Set by `popPivot`. */
  pivotRank = 0;
  /** A simplex number: a double from the start, so the field never changes representation (which deoptimises). */
  pivotIndex = 0.5;

  constructor(capacity = 1024) {
    this.ranks = new Int32Array(capacity);
    this.indices = new Float64Array(capacity);
    for (let b = 0; b < BUCKETS; b++) {
      this.bucketRanks.push(new Int32Array(64));
      this.bucketIndices.push(new Float64Array(64));
    }
  }

  /** Empties the column; the heap first takes ranks base … base + step − 1, later ranges step ranks at a time (step rounded up to a power of two). */
  clear(base = 0, step = 0x3fffffff): void {
    this.size = 0;
    this.runPosition = 0;
    this.runLength = 0;
    this.bucketSizes.fill(0);
    this.base = base;
    // A power of two, so that a rank's range is a shift away.
    this.shift = 0;
    while (2 ** this.shift < step && this.shift < 30) this.shift++;
    this.step = 2 ** this.shift;
    this.current = 0;
    this.bound = Math.min(0x7ffffffe, base + this.step - 1);
  }

  push(rank: number, index: number): void {
    if (rank <= this.bound) {
      this.heapPush(rank, index);
      return;
    }
    let b = (rank - this.base) >>> this.shift;
    if (b > LAST) b = LAST;
    const k = this.bucketSizes[b];
    if (k === this.bucketRanks[b].length) {
      const r = new Int32Array(k * 2);
      r.set(this.bucketRanks[b]);
      const x = new Float64Array(k * 2);
      x.set(this.bucketIndices[b]);
      this.bucketRanks[b] = r;
      this.bucketIndices[b] = x;
    }
    this.bucketRanks[b][k] = rank;
    this.bucketIndices[b][k] = index;
    this.bucketSizes[b] = k + 1;
  }

  private heapPush(rank: number, index: number): void {
    if (this.size === this.ranks.length) {
      const r = new Int32Array(this.size * 2);
      r.set(this.ranks);
      const x = new Float64Array(this.size * 2);
      x.set(this.indices);
      this.ranks = r;
      this.indices = x;
    }
    const ranks = this.ranks;
    const indices = this.indices;
    let i = this.size++;
    // invariant: the heap order holds everywhere except possibly between i and its parent
    while (i > 0) {
      const p = (i - 1) >> 1;
      const pr = ranks[p];
      if (pr < rank || (pr === rank && indices[p] >= index)) break;
      ranks[i] = pr;
      indices[i] = indices[p];
      i = p;
    }
    ranks[i] = rank;
    indices[i] = index;
  }

  private popTop(): void {
    const ranks = this.ranks;
    const indices = this.indices;
    const n = --this.size;
    if (n === 0) return;
    const rank = ranks[n];
    const index = indices[n];
    let i = 0;
    // invariant: the heap order holds everywhere except possibly between i and its children
    while (true) {
      let c = 2 * i + 1;
      if (c >= n) break;
      const c2 = c + 1;
      if (c2 < n && (ranks[c2] < ranks[c] || (ranks[c2] === ranks[c] && indices[c2] > indices[c]))) c = c2;
      if (rank < ranks[c] || (rank === ranks[c] && index >= indices[c])) break;
      ranks[i] = ranks[c];
      indices[i] = indices[c];
      i = c;
    }
    ranks[i] = rank;
    indices[i] = index;
  }

  /** Moves the next non-empty range into the heap; false when every range is empty. */
  private refill(): boolean {
    const sizes = this.bucketSizes;
    while (true) {
      let b = this.current + 1;
      while (b <= LAST && sizes[b] === 0) b++;
      if (b > LAST) return false;
      const br = this.bucketRanks[b];
      const bi = this.bucketIndices[b];
      const count = sizes[b];
      sizes[b] = 0;
      if (b < LAST) {
        this.current = b;
        this.bound = Math.min(0x7ffffffe, this.base + (b + 1) * this.step - 1);
        if (!this.sortRange(br, bi, count, this.base + b * this.step)) {
          for (let k = 0; k < count; k++) this.heapPush(br[k], bi[k]);
        }
        return true;
      }
      // The open range: start the ranges again from its smallest rank, twice as wide.
      let least = 0x7fffffff;
      for (let k = 0; k < count; k++) if (br[k] < least) least = br[k];
      const ranks = br.slice(0, count);
      const indices = bi.slice(0, count);
      this.base = least;
      if (this.shift < 30) this.shift++;
      this.step = 2 ** this.shift;
      this.current = -1;
      this.bound = least - 1;
      for (let k = 0; k < count; k++) this.push(ranks[k], indices[k]);
    }
  }

  /**
   * Sorts a range's entries into the run when its keys are exact doubles: key = (rank − low)·2^42 +
   * (2^42 − 1 − index), so ascending keys are ascending ranks, ties by descending index. Needs ranks within
   * 2^11 of `low` and indices below 2^42 (tetrahedra of up to about 2,950 vertices); false otherwise.
   */
  private sortRange(ranks: Int32Array, indices: Float64Array, count: number, low: number): boolean {
    if (this.step > 2048) return false;
    for (let k = 0; k < count; k++) if (indices[k] >= TWO42) return false;
    if (this.run.length < count) this.run = new Float64Array(Math.max(count, this.run.length * 2));
    const run = this.run;
    for (let k = 0; k < count; k++) run[k] = (ranks[k] - low) * TWO42 + (TWO42 - 1 - indices[k]);
    this.runPosition = 0;
    this.runLength = keepOdd(run.subarray(0, count).sort());
    this.runLow = low;
    return true;
  }

  /**
   * Removes and reports (in pivotRank, pivotIndex) the first entry with odd multiplicity over Z/2; entries
   * that occur an even number of times cancel. Returns false when the column is zero.
   */
  popPivot(): boolean {
    // invariant: every entry removed so far occurred an even number of times
    while (true) {
      const inRun = this.runPosition < this.runLength;
      if (this.size === 0 && !inRun) {
        if (!this.refill()) return false;
        continue;
      }
      let rank = 0;
      let index = 0;
      let multiplicity = 0;
      let runRank = 0x7fffffff;
      let runIndex = -1;
      if (inRun) {
        const key = this.run[this.runPosition];
        const offset = Math.floor(key / TWO42);
        runRank = this.runLow + offset;
        runIndex = TWO42 - 1 - (key - offset * TWO42);
      }
      if (this.size > 0) {
        const hr = this.ranks[0];
        const hi = this.indices[0];
        if (hr < runRank || (hr === runRank && hi >= runIndex)) {
          rank = hr;
          index = hi;
        } else {
          rank = runRank;
          index = runIndex;
        }
      } else {
        rank = runRank;
        index = runIndex;
      }
      if (inRun && runIndex === index) {
        this.runPosition++;
        multiplicity++;
      }
      while (this.size > 0 && this.indices[0] === index) {
        this.popTop();
        multiplicity++;
      }
      if (multiplicity & 1) {
        this.pivotRank = rank;
        this.pivotIndex = index;
        return true;
      }
    }
  }
}

const TWO42 = 2 ** 42;

/**
 * Over Z/2, entries that occur an even number of times cancel: moves the values of odd multiplicity of the
 * sorted array `sorted` to its front, in order, and returns how many there are.
 */
export function keepOdd(sorted: Float64Array): number {
  const length = sorted.length;
  let kept = 0;
  // invariant: sorted[0 … kept) holds the values of odd multiplicity among sorted[0 … r)
  for (let r = 0; r < length; ) {
    let q = r + 1;
    while (q < length && sorted[q] === sorted[r]) q++;
    if ((q - r) & 1) sorted[kept++] = sorted[r];
    r = q;
  }
  return kept;
}
