import { describe, expect, it } from 'vitest';
import {
  sampledDistance,
  sampledNorm,
  selectRows,
  stackLandscapes,
  stackMean,
} from '../../src/report/stack.js';

/** The tent of the pair (b, d) on a grid, from the definition max(0, min(t − b, d − t)) (Chazal et al. 2014). */
function tent(b: number, d: number, grid: { start: number; stop: number; count: number }): Float64Array {
  const out = new Float64Array(grid.count);
  const step = (grid.stop - grid.start) / (grid.count - 1);
  for (let j = 0; j < grid.count; j++) {
    const t = grid.start + j * step;
    out[j] = Math.max(0, Math.min(t - b, d - t));
  }
  return out;
}

describe('sampledNorm', () => {
  it('integrates a tent exactly in L1 and to O(h²) in L2, and takes its peak as the sup', () => {
    // Closed forms for a tent of base L = d − b (elementary calculus): ∫λ = L²/4, ∫λ² = L³/12, sup λ = L/2.
    // The trapezoid rule is exact for a piecewise-linear function whose breakpoints lie on the grid.
    const grid = { start: 0, stop: 4, count: 401 };
    const values = tent(1, 3, grid);
    expect(sampledNorm(values, 1, grid, 1)).toBeCloseTo(4 / 4, 12);
    expect(sampledNorm(values, 1, grid, 2)).toBeCloseTo(Math.sqrt(8 / 12), 4);
    expect(sampledNorm(values, 1, grid, Infinity)).toBe(1);
  });

  it('sums the layers inside the root and measures distances between stacks of the same layout', () => {
    const grid = { start: 0, stop: 2, count: 201 };
    const two = new Float64Array(2 * grid.count);
    two.set(tent(0, 2, grid), 0);
    two.set(tent(0.5, 1.5, grid), grid.count);
    // (∫λ₁ + ∫λ₂) = 2²/4 + 1²/4 = 1.25.
    expect(sampledNorm(two, 2, grid, 1)).toBeCloseTo(1.25, 12);
    expect(sampledDistance(two, new Float64Array(two.length), 2, grid, 1)).toBeCloseTo(1.25, 12);
    const stack = stackLandscapes([two, new Float64Array(two.length)], grid, 2);
    expect(stackMean(stack)[100]).toBeCloseTo(0.5, 12);
    expect(Array.from(selectRows(stack, [1]).values.subarray(0, 3))).toEqual([0, 0, 0]);
    expect(() => stackLandscapes([new Float64Array(3)], grid, 2)).toThrow(/expected 402/);
  });
});
