import { keepOdd } from './pivot-map.js';

/**
 * A working column whose entries never come before its last pivot: a multiset of cofacet entries
 * (rank, index) over Z/2, popped in filtration order — rank ascending, ties by descending index — with
 * entries of even multiplicity cancelling.
 *
 * Ranks are small integers, so entries are kept in one list per rank (a bucket queue): a push is three
 * typed-array writes, and the ranks are visited in increasing order. When the walk reaches a rank, its
 * entries are sorted by index once, repeated ones cancelled, and the rest kept as a run; entries pushed to
 * that rank later go to a small binary heap, and each pop takes the larger of the two tops. Pushing an
 * entry before the current pivot is a bug (the caller drops such entries: they sum to zero).
 *
 * Lists of earlier columns are told apart by an epoch stamp, so clearing the queue costs nothing per rank.
 */
export class RankQueue {
  private readonly head: Int32Array;
  private readonly stamp: Int32Array;
  private epoch = 0;
  private link = new Int32Array(1024);
  private indices = new Float64Array(1024);
  private length = 0;
  /** The rank being popped; every list below it is consumed. */
  private current = 0;
  private highest = -1;
  /** The current rank's remaining entries: odd multiplicity, sorted by ascending index, popped from the end. */
  private run = new Float64Array(256);
  private runLength = 0;
  /** Entries pushed to the current rank after its run was made: a binary max-heap of indices. */
  private late = new Float64Array(256);
  private lateSize = 0;
  /** Whether the current rank's list has been sorted into the run. */
  private merged = false;
  /** Set by `popPivot`. */
  pivotRank = 0;
  /** A simplex number: a double from the start, so the field never changes representation (which deoptimises). */
  pivotIndex = 0.5;

  constructor(rankCount: number) {
    this.head = new Int32Array(rankCount);
    this.stamp = new Int32Array(rankCount);
  }

  /** Empties the queue; no entry of rank below `lowest` will be pushed. */
  clear(lowest: number): void {
    this.epoch++;
    this.length = 0;
    this.current = lowest;
    this.highest = lowest - 1;
    this.runLength = 0;
    this.lateSize = 0;
    this.merged = false;
  }

  push(rank: number, index: number): void {
    if (rank === this.current && this.merged) {
      this.pushLate(index);
      return;
    }
    if (this.length === this.indices.length) {
      const link = new Int32Array(this.length * 2);
      link.set(this.link);
      this.link = link;
      const indices = new Float64Array(this.length * 2);
      indices.set(this.indices);
      this.indices = indices;
    }
    const e = this.length++;
    this.indices[e] = index;
    if (this.stamp[rank] === this.epoch) this.link[e] = this.head[rank];
    else {
      this.stamp[rank] = this.epoch;
      this.link[e] = -1;
    }
    this.head[rank] = e;
    if (rank > this.highest) this.highest = rank;
  }

  /**
   * Removes and reports (in pivotRank, pivotIndex) the first entry of odd multiplicity; false when the
   * column is zero.
   */
  popPivot(): boolean {
    // invariant: every list of rank below `current` has been consumed, and the current one too once merged
    while (true) {
      if (!this.merged) {
        const rank = this.current;
        if (rank < this.head.length && this.stamp[rank] === this.epoch) this.mergeList(rank);
        this.merged = true;
      }
      while (this.runLength > 0 || this.lateSize > 0) {
        const fromRun = this.runLength > 0 ? this.run[this.runLength - 1] : -1;
        const fromLate = this.lateSize > 0 ? this.late[0] : -1;
        const index = fromRun > fromLate ? fromRun : fromLate;
        let multiplicity = 0;
        if (fromRun === index) {
          this.runLength--;
          multiplicity++;
        }
        while (this.lateSize > 0 && this.late[0] === index) {
          this.popLate();
          multiplicity++;
        }
        if (multiplicity & 1) {
          this.pivotRank = this.current;
          this.pivotIndex = index;
          return true;
        }
      }
      if (this.current >= this.highest) return false;
      this.current++;
      this.merged = false;
    }
  }

  /** Sorts the list of `rank` into the run, cancelling repeated indices. */
  private mergeList(rank: number): void {
    let count = 0;
    for (let e = this.head[rank]; e >= 0; e = this.link[e]) count++;
    if (this.run.length < count) this.run = new Float64Array(Math.max(count, this.run.length * 2));
    const run = this.run;
    let w = 0;
    for (let e = this.head[rank]; e >= 0; e = this.link[e]) run[w++] = this.indices[e];
    this.runLength = keepOdd(run.subarray(0, w).sort());
  }

  private pushLate(index: number): void {
    if (this.lateSize === this.late.length) {
      const late = new Float64Array(this.lateSize * 2);
      late.set(this.late);
      this.late = late;
    }
    const late = this.late;
    let i = this.lateSize++;
    // invariant: the heap order holds everywhere except possibly between i and its parent
    while (i > 0) {
      const parent = (i - 1) >> 1;
      if (late[parent] >= index) break;
      late[i] = late[parent];
      i = parent;
    }
    late[i] = index;
  }

  private popLate(): void {
    const late = this.late;
    const size = --this.lateSize;
    if (size === 0) return;
    const index = late[size];
    let i = 0;
    // invariant: the heap order holds everywhere except possibly between i and its children
    while (true) {
      let child = 2 * i + 1;
      if (child >= size) break;
      if (child + 1 < size && late[child + 1] > late[child]) child++;
      if (index >= late[child]) break;
      late[i] = late[child];
      i = child;
    }
    late[i] = index;
  }
}
