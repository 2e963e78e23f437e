import { describe, expect, it } from 'vitest';
import {
  BinomialTable,
  binomial,
  condensedIndex,
  edgeEndpoints,
  maxVertexCount,
} from '../../src/homology/simplex-index.js';

describe('combinatorial number system', () => {
  it('numbers the k-subsets of n vertices 0 … C(n, k) − 1 in colexicographic order, one to one', () => {
    // The combinatorial number system: {v_k > … > v_1} ↦ Σ C(v_i, i) is a bijection onto 0 … C(n, k) − 1
    // (Knuth, "The Art of Computer Programming", vol. 4A, 2011, section 7.2.1.3).
    const n = 9;
    const table = new BinomialTable(n, 4);
    for (let k = 1; k <= 4; k++) {
      const seen = new Set<number>();
      const out = new Int32Array(4);
      const visit = (prefix: number[], start: number): void => {
        if (prefix.length === k) {
          const desc = [...prefix].sort((a, b) => b - a);
          let index = 0;
          desc.forEach((v, p) => {
            index += binomial(v, k - p);
          });
          seen.add(index);
          table.vertices(index, k, out);
          expect(Array.from(out.slice(0, k))).toEqual(desc);
          return;
        }
        for (let v = start; v < n; v++) visit([...prefix, v], v + 1);
      };
      visit([], 0);
      expect(seen.size).toBe(binomial(n, k));
      expect(Math.max(...seen)).toBe(binomial(n, k) - 1);
    }
  });

  it('lays edges out as j(j−1)/2 + i and decodes them back', () => {
    expect(condensedIndex(0, 1, 5)).toBe(0);
    expect(condensedIndex(2, 4, 5)).toBe(8);
    expect(condensedIndex(4, 2, 5)).toBe(8);
    for (let e = 0; e < 5000; e++) {
      const [i, j] = edgeEndpoints(e);
      expect(condensedIndex(i, j, 200)).toBe(e);
    }
    expect(() => condensedIndex(3, 3, 5)).toThrow(RangeError);
  });

  it('knows how many vertices keep simplex numbers exact', () => {
    const n4 = maxVertexCount(4);
    expect(binomial(n4, 4)).toBeLessThanOrEqual(Number.MAX_SAFE_INTEGER);
    expect(binomial(n4 + 1, 4)).toBeGreaterThan(Number.MAX_SAFE_INTEGER);
    expect(binomial(10, 3)).toBe(120); // 10·9·8 / 3! (worked by hand)
  });
});
