import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { maximumMatching, solveAssignment } from '../../src/homology/assignment.js';

function permutations(n: number): number[][] {
  if (n === 0) return [[]];
  const out: number[][] = [];
  for (const rest of permutations(n - 1))
    for (let i = 0; i <= rest.length; i++) out.push([...rest.slice(0, i), n - 1, ...rest.slice(i)]);
  return out;
}

describe('solveAssignment', () => {
  it('solves a textbook example', () => {
    // 3×3 example worked by hand: the optimum takes 1 + 2 + 2 = 5 (rows → columns 1, 0, 2).
    const cost = Float64Array.from([4, 1, 3, 2, 0, 5, 3, 2, 2]);
    const { columnOfRow, total } = solveAssignment(cost, 3);
    expect(total).toBe(5);
    expect([...columnOfRow]).toEqual([1, 0, 2]);
  });

  it('agrees with trying every permutation on random matrices', () => {
    fc.assert(
      fc.property(
        fc
          .integer({ min: 1, max: 6 })
          .chain((n) =>
            fc.tuple(
              fc.constant(n),
              fc.array(fc.double({ min: -5, max: 10, noNaN: true }), { minLength: n * n, maxLength: n * n }),
            ),
          ),
        ([n, values]) => {
          const cost = Float64Array.from(values);
          let best = Infinity;
          for (const perm of permutations(n))
            best = Math.min(
              best,
              perm.reduce((s, c, r) => s + cost[r * n + c], 0),
            );
          const { columnOfRow, total } = solveAssignment(cost, n);
          const distinct = new Set(columnOfRow).size === n;
          return distinct && Math.abs(total - best) <= 1e-9 * (1 + Math.abs(best));
        },
      ),
      { numRuns: 200 },
    );
  });
});

describe('maximumMatching', () => {
  it('finds the maximum of a graph where greedy choice fails', () => {
    // Left 0 – {0, 1}, left 1 – {0}: greedy 0→0 blocks 1; the maximum is 2.
    expect(maximumMatching(2, 2, Int32Array.from([0, 2, 3]), Int32Array.from([0, 1, 0]))).toBe(2);
    // König: a star has matching number 1.
    expect(maximumMatching(3, 1, Int32Array.from([0, 1, 2, 3]), Int32Array.from([0, 0, 0]))).toBe(1);
  });
});
