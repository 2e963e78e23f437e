import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { makeDiagram } from '../../src/core/diagram.js';
import { gridPoints } from '../../src/landscape/grid.js';
import { sampleLandscape } from '../../src/landscape/sampled-landscape.js';
import { anyDiagram, definitionValue } from './reference.js';

describe('sampleLandscape', () => {
  it('agrees with the definition on random diagrams and grids', () => {
    // λ_k(t) = k-th largest tent (Chazal, Fasy, Lecci, Rinaldo, Wasserman, "Stochastic convergence of persistence landscapes and silhouettes", 2014).
    fc.assert(
      fc.property(
        anyDiagram,
        fc.double({ min: -4, max: 2, noNaN: true }),
        fc.double({ min: 0.1, max: 9, noNaN: true }),
        fc.integer({ min: 2, max: 40 }),
        fc.integer({ min: 1, max: 8 }),
        (diagram, start, width, count, depth) => {
          const grid = { start, stop: start + width, count };
          const s = sampleLandscape(diagram, grid, depth);
          const ts = gridPoints(grid);
          if (s.values.length !== depth * count) return false;
          for (let k = 1; k <= depth; k++) {
            for (let i = 0; i < count; i++) {
              const want = definitionValue(diagram, k, ts[i]);
              if (Math.abs(s.values[(k - 1) * count + i] - want) > 1e-12 * (1 + want)) return false;
            }
          }
          return true;
        },
      ),
      { numRuns: 300 },
    );
  });

  it('includes the lattice ties exactly (hand-worked)', () => {
    // Pairs (0,4), (1,3), (2,6), (2,6), (5,7), (8,9) on t = 0..9, worked by hand from the definition.
    const d = makeDiagram(1, [
      [0, 4],
      [1, 3],
      [2, 6],
      [2, 6],
      [5, 7],
      [8, 9],
    ]);
    const s = sampleLandscape(d, { start: 0, stop: 9, count: 10 }, 3);
    expect([...s.values.subarray(0, 10)]).toEqual([0, 1, 2, 1, 2, 1, 1, 0, 0, 0]);
    expect([...s.values.subarray(10, 20)]).toEqual([0, 0, 1, 1, 2, 1, 0, 0, 0, 0]);
    expect([...s.values.subarray(20, 30)]).toEqual([0, 0, 0, 1, 0, 0, 0, 0, 0, 0]);
  });

  it('writes into a shared buffer at an offset, overwriting old contents and leaving the rest alone', () => {
    const d = makeDiagram(0, [[0, 2]]);
    const grid = { start: 0, stop: 2, count: 5 };
    const out = new Float64Array(30).fill(7);
    const s = sampleLandscape(d, grid, 2, out, 10);
    expect(s.values.buffer).toBe(out.buffer);
    expect([...out.subarray(10, 20)]).toEqual([0, 0.5, 1, 0.5, 0, 0, 0, 0, 0, 0]);
    expect(out[9]).toBe(7);
    expect(out[20]).toBe(7);
    expect(() => sampleLandscape(d, grid, 2, out, 25)).toThrow(/needed at offset 25/);
  });

  it('gives all-zero layers beyond the pairs and refuses essential classes', () => {
    const s = sampleLandscape(makeDiagram(1, [[0, 1]]), { start: 0, stop: 1, count: 3 }, 4);
    expect([...s.values.subarray(3)]).toEqual(new Array(9).fill(0));
    expect(() =>
      sampleLandscape(makeDiagram(1, [[0, Infinity]]), { start: 0, stop: 1, count: 3 }, 1),
    ).toThrow(/finitePairs/);
  });
});
