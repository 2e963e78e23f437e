import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { Random } from '../../src/core/random.js';
import {
  KdTree,
  nearestNeighbours,
  nearestNeighboursByScan,
  nearestNeighboursFromMatrix,
} from '../../src/homology/nearest.js';

function cloud(seed: number, count: number, dim: number): Float64Array {
  const r = new Random(seed);
  return Float64Array.from({ length: count * dim }, () => r.normal());
}

describe('k nearest neighbours', () => {
  it('finds the neighbours of a hand-worked line of points', () => {
    // Points 0, 1, 3, 7 on a line: from 3 the nearest are 3 (itself), 1, then 0 (distance 3) and 7 (distance 4).
    const t = nearestNeighbours([0, 1, 3, 7], 4, 1, 3);
    expect(Array.from(t.indices.subarray(6, 9))).toEqual([2, 1, 0]);
    expect(Array.from(t.squaredDistances.subarray(6, 9))).toEqual([0, 4, 9]);
    const without = nearestNeighbours([0, 1, 3, 7], 4, 1, 2, { includeSelf: false });
    expect(Array.from(without.indices.subarray(4, 6))).toEqual([1, 0]);
  });

  it('agrees with a direct scan in 1, 2, 3 and 5 dimensions (the definition computed directly)', () => {
    for (const dim of [1, 2, 3, 5]) {
      const n = 400;
      const c = cloud(dim, n, dim);
      for (const includeSelf of [true, false]) {
        const tree = nearestNeighbours(c, n, dim, 7, { includeSelf, leafSize: 4 });
        const scan = nearestNeighboursByScan(c, n, dim, 7, { includeSelf });
        // Distances must match exactly; indices too, as the Gaussian cloud has no ties.
        expect(Array.from(tree.squaredDistances)).toEqual(Array.from(scan.squaredDistances));
        expect(Array.from(tree.indices)).toEqual(Array.from(scan.indices));
      }
    }
  });

  it("gives the scan's distances on integer clouds full of ties, whatever the leaf size", () => {
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 4 }),
        fc.array(fc.integer({ min: 0, max: 3 }), { minLength: 8, maxLength: 160 }),
        fc.integer({ min: 1, max: 6 }),
        (dim, values, leafSize) => {
          const count = Math.floor(values.length / dim);
          const c = Float64Array.from(values.slice(0, count * dim));
          const k = Math.min(4, count);
          const tree = nearestNeighbours(c, count, dim, k, { leafSize });
          const scan = nearestNeighboursByScan(c, count, dim, k);
          expect(Array.from(tree.squaredDistances)).toEqual(Array.from(scan.squaredDistances));
        },
      ),
      { numRuns: 200, seed: 3 },
    );
  });

  it('copes with many duplicate points (all distances 0 among them)', () => {
    const c = new Float64Array(2 * 50); // 50 copies of the origin
    c.set([5, 5], 0);
    const t = nearestNeighbours(c, 50, 2, 10);
    expect(Array.from(t.squaredDistances.subarray(0, 10))).toEqual([0, 50, 50, 50, 50, 50, 50, 50, 50, 50]);
    expect(Array.from(t.squaredDistances.subarray(10, 20)).every((d) => d === 0)).toBe(true);
  });

  it('answers a query from outside the cloud', () => {
    const c = cloud(4, 300, 3);
    const tree = new KdTree(c, 300, 3, 8);
    const idx = new Int32Array(5);
    const dist = new Float64Array(5);
    const q = [0.3, -0.2, 0.1];
    expect(tree.nearest(q, 0, 5, idx, dist, 0)).toBe(5);
    const all = Array.from(
      { length: 300 },
      (_, i) => (c[3 * i] - q[0]) ** 2 + (c[3 * i + 1] - q[1]) ** 2 + (c[3 * i + 2] - q[2]) ** 2,
    ).sort((a, b) => a - b);
    expect(Array.from(dist)).toEqual(all.slice(0, 5));
  });

  it('reads neighbours from a distance matrix', () => {
    // Distances among 0, 1, 3, 7 on a line.
    const x = [0, 1, 3, 7];
    const m = Float64Array.from({ length: 16 }, (_, i) => Math.abs(x[i >> 2] - x[i & 3]));
    const t = nearestNeighboursFromMatrix(m, 4, 3);
    expect(Array.from(t.indices)).toEqual(Array.from(nearestNeighbours(x, 4, 1, 3).indices));
    expect(Array.from(t.squaredDistances.subarray(9, 12))).toEqual([0, 16, 36]);
  });

  it('rejects a k the cloud cannot give', () => {
    expect(() => nearestNeighbours([0, 1], 2, 1, 3)).toThrow(RangeError);
    expect(() => nearestNeighbours([0, 1], 2, 1, 2, { includeSelf: false })).toThrow(RangeError);
  });
});
