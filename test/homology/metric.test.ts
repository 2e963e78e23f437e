import { describe, expect, it } from 'vitest';
import { condenseMatrix, pairwiseDistances } from '../../src/homology/metric.js';
import { condensedIndex } from '../../src/homology/simplex-index.js';

describe('pairwiseDistances', () => {
  it('gives the three metrics on a worked example', () => {
    // (0, 0) and (3, 4): Euclidean 5 (the 3-4-5 triangle), Manhattan 3 + 4 = 7, Chebyshev max(3, 4) = 4.
    const c = Float64Array.from([0, 0, 3, 4, 3, 0]);
    const e = pairwiseDistances(c, 3, 2, 'euclidean');
    expect(e[condensedIndex(0, 1, 3)]).toBe(5);
    expect(e[condensedIndex(1, 2, 3)]).toBe(4);
    expect(e[condensedIndex(0, 2, 3)]).toBe(3);
    expect(pairwiseDistances(c, 3, 2, 'manhattan')[condensedIndex(0, 1, 3)]).toBe(7);
    expect(pairwiseDistances(c, 3, 2, 'chebyshev')[condensedIndex(0, 1, 3)]).toBe(4);
  });

  it('condenses a full matrix into the same layout', () => {
    const c = Float64Array.from([0, 1, 5, 2, 2, 7, -1, 0]);
    const e = pairwiseDistances(c, 4, 2);
    const m = new Float64Array(16);
    for (let i = 0; i < 4; i++)
      for (let j = 0; j < 4; j++) if (i !== j) m[i * 4 + j] = e[condensedIndex(i, j, 4)];
    expect(Array.from(condenseMatrix(m, 4))).toEqual(Array.from(e));
  });

  it('refuses coordinates of the wrong length', () => {
    expect(() => pairwiseDistances(new Float64Array(5), 3, 2)).toThrow(/need 6/);
  });
});
