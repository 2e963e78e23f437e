import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { type Diagram, makeDiagram } from '../../src/core/diagram.js';
import { bottleneckDistance, distanceMatrix, wassersteinDistance } from '../../src/homology/distance.js';

/**
 * Brute force from the definition (Cohen-Steiner, Edelsbrunner and Harer, "Stability of persistence
 * diagrams", 2007; Cohen-Steiner, Edelsbrunner, Harer and Mileyko, "Lipschitz functions have Lp-stable
 * persistence", 2010): try every partial matching of the finite points of a with those of b; every
 * unmatched point goes to the diagonal at L∞ distance (d − b)/2.
 */
function bruteForce(a: Diagram, b: Diagram, combine: (costs: number[]) => number): number {
  const A = [...a.births].map((x, i) => [x, a.deaths[i]]);
  const B = [...b.births].map((x, i) => [x, b.deaths[i]]);
  const used = new Array(B.length).fill(false);
  let best = Infinity;
  const costs: number[] = [];
  const visit = (i: number): void => {
    if (i === A.length) {
      const all = [...costs];
      B.forEach((q, j) => {
        if (!used[j]) all.push((q[1] - q[0]) / 2);
      });
      best = Math.min(best, combine(all));
      return;
    }
    costs.push((A[i][1] - A[i][0]) / 2);
    visit(i + 1);
    costs.pop();
    for (let j = 0; j < B.length; j++) {
      if (used[j]) continue;
      used[j] = true;
      costs.push(Math.max(Math.abs(A[i][0] - B[j][0]), Math.abs(A[i][1] - B[j][1])));
      visit(i + 1);
      costs.pop();
      used[j] = false;
    }
  };
  visit(0);
  return best;
}

const maxOf = (c: number[]) => c.reduce((m, x) => Math.max(m, x), 0);
const powerSum = (p: number) => (c: number[]) => c.reduce((s, x) => s + x ** p, 0) ** (1 / p);

const smallDiagram = (maxLength: number) =>
  fc
    .array(
      fc.tuple(
        fc.integer({ min: 0, max: 10 }),
        fc.integer({ min: 0, max: 6 }),
        fc.double({ min: 0, max: 1, noNaN: true }),
      ),
      {
        maxLength,
      },
    )
    .map((pairs) =>
      makeDiagram(
        1,
        pairs.map(
          ([b, len, jitter]) => [b / 2 + jitter * 0.1, b / 2 + jitter * 0.1 + len / 3] as [number, number],
        ),
      ),
    );

describe('bottleneckDistance', () => {
  it('matches hand-worked examples', () => {
    // Worked by hand from the definition (Cohen-Steiner, Edelsbrunner, Harer, 2007).
    expect(bottleneckDistance(makeDiagram(1, [[0, 2]]), makeDiagram(1, [[0, 3]]))).toBe(1);
    expect(bottleneckDistance(makeDiagram(1, [[0, 2]]), makeDiagram(1, []))).toBe(1);
    expect(
      bottleneckDistance(
        makeDiagram(1, [
          [0, 4],
          [1, 2],
        ]),
        makeDiagram(1, [[0, 4.5]]),
      ),
    ).toBe(0.5);
    // Two far-apart points each closer to the diagonal than to the other: both go to the diagonal.
    expect(bottleneckDistance(makeDiagram(1, [[0, 1]]), makeDiagram(1, [[5, 6]]))).toBe(0.5);
    expect(bottleneckDistance(makeDiagram(1, []), makeDiagram(1, []))).toBe(0);
    // Zero-length pairs lie on the diagonal.
    expect(bottleneckDistance(makeDiagram(1, [[3, 3]]), makeDiagram(1, []))).toBe(0);
  });

  it('matches essential classes among themselves, by count', () => {
    const a = makeDiagram(0, [
      [0, Infinity],
      [0, 1],
    ]);
    const b = makeDiagram(0, [
      [0.25, Infinity],
      [0, 1],
    ]);
    expect(bottleneckDistance(a, b)).toBe(0.25);
    expect(bottleneckDistance(a, makeDiagram(0, [[0, 1]]))).toBe(Infinity);
    expect(
      bottleneckDistance(
        makeDiagram(0, [
          [0, Infinity],
          [2, Infinity],
        ]),
        makeDiagram(0, [
          [2.5, Infinity],
          [0.5, Infinity],
        ]),
      ),
    ).toBe(0.5);
  });

  it('agrees with a brute-force matching on random small diagrams', () => {
    fc.assert(
      fc.property(smallDiagram(5), smallDiagram(5), (a, b) => {
        const want = bruteForce(a, b, maxOf);
        return Math.abs(bottleneckDistance(a, b) - want) <= 1e-12;
      }),
      { numRuns: 200 },
    );
  });

  it('is a metric on samples: symmetric, zero on itself, triangle inequality', () => {
    // Metric properties of the bottleneck distance (Cohen-Steiner, Edelsbrunner, Harer, 2007).
    fc.assert(
      fc.property(smallDiagram(7), smallDiagram(7), smallDiagram(7), (a, b, c) => {
        const ab = bottleneckDistance(a, b);
        return (
          ab === bottleneckDistance(b, a) &&
          bottleneckDistance(a, a) === 0 &&
          bottleneckDistance(a, c) <= ab + bottleneckDistance(b, c) + 1e-12
        );
      }),
      { numRuns: 150 },
    );
  });
});

describe('wassersteinDistance', () => {
  it('matches hand-worked examples', () => {
    // (0,2)→(0,3) costs 1, (1,1.5)→diagonal costs 0.25 (worked by hand).
    const a = makeDiagram(1, [
      [0, 2],
      [1, 1.5],
    ]);
    const b = makeDiagram(1, [[0, 3]]);
    expect(wassersteinDistance(a, b, 1)).toBe(1.25);
    expect(wassersteinDistance(a, b, 2)).toBeCloseTo(Math.sqrt(1 + 0.0625), 14);
    // With the Euclidean ground metric the diagonal is (d − b)/√2 away.
    expect(wassersteinDistance(makeDiagram(1, [[0, 2]]), makeDiagram(1, []), 2, 2)).toBeCloseTo(
      Math.SQRT2,
      14,
    );
    expect(wassersteinDistance(makeDiagram(1, [[0, 2]]), makeDiagram(1, [[1, 3]]), 1, 1)).toBe(2);
    expect(wassersteinDistance(a, b, Infinity)).toBe(bottleneckDistance(a, b));
    expect(
      wassersteinDistance(
        makeDiagram(0, [[0, Infinity]]),
        makeDiagram(0, [
          [1, Infinity],
          [2, Infinity],
        ]),
      ),
    ).toBe(Infinity);
    expect(
      wassersteinDistance(
        makeDiagram(0, [
          [0, Infinity],
          [0, 1],
        ]),
        makeDiagram(0, [[1, Infinity]]),
        1,
      ),
    ).toBe(1.5);
  });

  it('agrees with a brute-force matching for p = 1, 2, 3', () => {
    fc.assert(
      fc.property(smallDiagram(5), smallDiagram(5), fc.constantFrom(1, 2, 3), (a, b, p) => {
        const want = bruteForce(a, b, powerSum(p));
        return Math.abs(wassersteinDistance(a, b, p) - want) <= 1e-9 * (1 + want);
      }),
      { numRuns: 200 },
    );
  });

  it('satisfies the triangle inequality and bounds the bottleneck distance from above', () => {
    // W_p is a metric and W_p ≥ W_∞ = d_B (Cohen-Steiner, Edelsbrunner, Harer, Mileyko, 2010).
    fc.assert(
      fc.property(smallDiagram(7), smallDiagram(7), smallDiagram(7), fc.constantFrom(1, 2), (a, b, c, p) => {
        const ab = wassersteinDistance(a, b, p);
        return (
          wassersteinDistance(a, c, p) <= ab + wassersteinDistance(b, c, p) + 1e-9 &&
          ab >= bottleneckDistance(a, b) - 1e-12
        );
      }),
      { numRuns: 150 },
    );
  });

  it('refuses p < 1', () => {
    expect(() => wassersteinDistance(makeDiagram(1, []), makeDiagram(1, []), 0.5)).toThrow(/≥ 1/);
  });
});

describe('distanceMatrix', () => {
  it('fills a symmetric matrix once per pair, or a rectangular one, reporting progress', () => {
    const ds = [makeDiagram(1, [[0, 2]]), makeDiagram(1, [[0, 3]]), makeDiagram(1, [])];
    const calls: Array<[number, number]> = [];
    const sym = distanceMatrix(ds, undefined, { onProgress: (done, total) => calls.push([done, total]) });
    // Bottleneck values worked by hand: (0,2)–(0,3) 1; to the empty diagram 1 and 1.5.
    expect([...sym.data]).toEqual([0, 1, 1, 1, 0, 1.5, 1, 1.5, 0]);
    expect(calls.at(-1)).toEqual([3, 3]);
    const rect = distanceMatrix(ds.slice(0, 1), ds, { metric: { kind: 'wasserstein', p: 1 } });
    expect(rect.rows).toBe(1);
    expect(rect.cols).toBe(3);
    expect([...rect.data]).toEqual([0, 1, 1]);
  });
});
