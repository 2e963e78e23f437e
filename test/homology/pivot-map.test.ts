import { describe, expect, it } from 'vitest';
import { Random } from '../../src/core/random.js';
import { CofacetHeap, keepOdd, PivotMap } from '../../src/homology/pivot-map.js';

describe('PivotMap', () => {
  it('stores and finds keys beyond 2^32, growing as needed', () => {
    const m = new PivotMap(4);
    const keys = [0, 1, 2 ** 32 + 5, 2 ** 40 + 7, 2 ** 52 + 1, 12345];
    keys.forEach((k, v) => {
      m.set(k, v);
    });
    keys.forEach((k, v) => {
      expect(m.get(k)).toBe(v);
    });
    expect(m.get(2 ** 32 + 6)).toBe(-1);
    expect(m.has(7)).toBe(false);
  });
});

describe('CofacetHeap', () => {
  /** The reference: entries of odd multiplicity, by rank ascending then index descending. */
  function reference(entries: Array<[number, number]>): Array<[number, number]> {
    const count = new Map<number, [number, number, number]>();
    for (const [r, i] of entries) {
      const c = count.get(i);
      count.set(i, [r, i, (c?.[2] ?? 0) + 1]);
    }
    return [...count.values()]
      .filter((x) => x[2] % 2 === 1)
      .map((x): [number, number] => [x[0], x[1]])
      .sort((a, b) => a[0] - b[0] || b[1] - a[1]);
  }

  it('pops the entries of odd multiplicity in pivot order, with and without rank ranges', () => {
    const rng = new Random(2);
    for (const [base, step] of [
      [0, 0x3fffffff],
      [0, 4],
      [10, 1],
    ]) {
      const heap = new CofacetHeap(4);
      heap.clear(base, step);
      const entries: Array<[number, number]> = [];
      for (let k = 0; k < 3000; k++) {
        const index = rng.int(800);
        const rank = base + (index % 97); // one rank per simplex, as in the engine
        entries.push([rank, index]);
        heap.push(rank, index);
      }
      const got: Array<[number, number]> = [];
      while (heap.popPivot()) got.push([heap.pivotRank, heap.pivotIndex]);
      expect(got).toEqual(reference(entries));
    }
  });
});

describe('keepOdd', () => {
  it('keeps, in order, the values that occur an odd number of times (cancellation over Z/2)', () => {
    const a = Float64Array.from([1, 1, 2, 3, 3, 3, 5, 7, 7, 7, 7, 9]);
    const kept = keepOdd(a);
    expect(Array.from(a.subarray(0, kept))).toEqual([2, 3, 5, 9]);
    expect(keepOdd(new Float64Array(0))).toBe(0);
    expect(keepOdd(Float64Array.from([4, 4]))).toBe(0);
  });
});
