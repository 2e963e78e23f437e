import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { makeDiagram } from '../../src/core/diagram.js';
import { evaluate, evaluateLayer } from '../../src/landscape/algebra.js';
import { exactLandscape } from '../../src/landscape/exact-landscape.js';
import { anyDiagram, definitionValue } from './reference.js';

/** Probe points: every breakpoint candidate (births, deaths, midpoints, crossings) and points between. */
function probes(births: Float64Array, deaths: Float64Array): number[] {
  const out = new Set<number>();
  const ends = [...births, ...deaths];
  for (const x of ends) for (const y of ends) out.add((x + y) / 2);
  const sorted = [...out].sort((a, b) => a - b);
  const all = [...sorted];
  for (let i = 0; i + 1 < sorted.length; i++)
    all.push((sorted[i] + sorted[i + 1]) / 2, sorted[i] + 0.3 * (sorted[i + 1] - sorted[i]));
  if (sorted.length > 0) all.push(sorted[0] - 1, sorted[sorted.length - 1] + 1);
  return all;
}

describe('exactLandscape', () => {
  it('matches a hand-worked example', () => {
    // Worked by hand from the definition λ_k(t) = k-th largest tent (Chazal, Fasy, Lecci, Rinaldo, Wasserman, 2014).
    const L = exactLandscape(
      makeDiagram(1, [
        [0, 4],
        [1, 3],
        [2, 6],
        [2, 6],
        [5, 7],
        [8, 9],
      ]),
    );
    const pts = L.layers.map((l) => [...l.t].map((t, i) => [t, l.v[i]]));
    expect(pts).toEqual([
      [
        [0, 0],
        [2, 2],
        [3, 1],
        [4, 2],
        [5.5, 0.5],
        [6, 1],
        [7, 0],
        [8, 0],
        [8.5, 0.5],
        [9, 0],
      ],
      [
        [1, 0],
        [2, 1],
        [2.5, 0.5],
        [4, 2],
        [6, 0],
      ],
      [
        [2, 0],
        [3, 1],
        [4, 0],
        [5, 0],
        [5.5, 0.5],
        [6, 0],
      ],
      [
        [2, 0],
        [2.5, 0.5],
        [3, 0],
      ],
    ]);
  });

  it('agrees with the definition on random diagrams with ties and duplicates', () => {
    // Property check against Chazal, Fasy, Lecci, Rinaldo, Wasserman, "Stochastic convergence of persistence landscapes and silhouettes", 2014.
    fc.assert(
      fc.property(anyDiagram, (diagram) => {
        const L = exactLandscape(diagram);
        const ts = probes(diagram.births, diagram.deaths);
        const depth = diagram.births.length + 1;
        for (const t of ts) {
          for (let k = 1; k <= depth; k++) {
            const want = definitionValue(diagram, k, t);
            const got = evaluate(L, k, t);
            if (Math.abs(want - got) > 1e-9 * (1 + Math.abs(want))) return false;
          }
        }
        return true;
      }),
      { numRuns: 300 },
    );
  });

  it('has strictly increasing breakpoints starting and ending at zero, and no layer beyond the pairs', () => {
    fc.assert(
      fc.property(anyDiagram, (diagram) => {
        const L = exactLandscape(diagram);
        let positive = 0;
        for (let i = 0; i < diagram.births.length; i++) if (diagram.deaths[i] > diagram.births[i]) positive++;
        if (L.layers.length > positive) return false;
        for (const layer of L.layers) {
          const m = layer.t.length;
          if (m < 3 || layer.v[0] !== 0 || layer.v[m - 1] !== 0) return false;
          for (let i = 1; i < m; i++) if (!(layer.t[i] > layer.t[i - 1])) return false;
          for (let i = 0; i < m; i++) if (layer.v[i] < 0) return false;
          // No redundant breakpoints: at every positive interior point the layer turns.
          for (let i = 1; i + 1 < m; i++) {
            if (
              layer.v[i] > 0 &&
              Math.sign(layer.v[i] - layer.v[i - 1]) === Math.sign(layer.v[i + 1] - layer.v[i])
            )
              return false;
          }
        }
        return true;
      }),
      { numRuns: 300 },
    );
  });

  it('ignores zero-length pairs and stops at maxDepth', () => {
    const d = makeDiagram(0, [
      [1, 1],
      [0, 2],
      [0, 2],
      [0, 2],
      [3, 3],
    ]);
    expect(exactLandscape(d).layers.length).toBe(3);
    expect(exactLandscape(d, { maxDepth: 2 }).layers.length).toBe(2);
    expect(exactLandscape(makeDiagram(0, [[1, 1]])).layers).toEqual([]);
    const top = exactLandscape(d, { maxDepth: 1 }).layers[0];
    expect(evaluateLayer(top, 1)).toBe(1);
  });

  it('refuses an essential class or NaN', () => {
    expect(() => exactLandscape(makeDiagram(0, [[0, Infinity]]))).toThrow(/finitePairs/);
    expect(() => exactLandscape(makeDiagram(0, [[Number.NaN, 1]]))).toThrow(/finite pairs/);
  });

  it('handles long nested and chained diagrams', () => {
    // Nested pairs (i, 2n − i): layer k is the single tent of pair k − 1.
    const n = 200;
    const nested = makeDiagram(
      1,
      Array.from({ length: n }, (_, i) => [i, 2 * n - i] as [number, number]),
    );
    const L = exactLandscape(nested);
    expect(L.layers.length).toBe(n);
    expect([...L.layers[9].t]).toEqual([9, n, 2 * n - 9]);
    // Chained overlapping pairs (i, i + 2): two layers.
    const chain = makeDiagram(
      1,
      Array.from({ length: n }, (_, i) => [i, i + 2] as [number, number]),
    );
    const C = exactLandscape(chain);
    expect(C.layers.length).toBe(2);
    // At t = 51 the tent (50, 52) peaks at 1 and its neighbours touch zero; at 50.5 two tents cross at 0.5.
    expect(evaluate(C, 1, 51)).toBe(1);
    expect(evaluate(C, 2, 51)).toBe(0);
    expect(evaluate(C, 1, 50.5)).toBe(0.5);
    expect(evaluate(C, 2, 50.5)).toBe(0.5);
  });
});
