import { describe, expect, it } from 'vitest';
import type { Matrix } from '../../src/core/matrix.js';
import { Random } from '../../src/core/random.js';
import {
  combinePairWeights,
  groupsByDegreeLayer,
  permutationImportance,
  weightCurves,
} from '../../src/learn/importance.js';

const locations = [
  { degree: 1, layer: 1, t: 0.5 },
  { degree: 0, layer: 1, t: 0.2 },
  { degree: 1, layer: 1, t: 0.1 },
  undefined,
  { degree: 1, layer: 2, t: 0.1 },
];

describe('weightCurves', () => {
  it('puts each weight at its (degree, layer, t) and sorts by t', () => {
    const curves = weightCurves([10, 20, 30, 40, 50], locations);
    expect(curves.map((c) => [c.degree, c.layer, Array.from(c.t), Array.from(c.value)])).toEqual([
      [0, 1, [0.2], [20]],
      [1, 1, [0.1, 0.5], [30, 10]],
      [1, 2, [0.1], [50]],
    ]);
  });
  it('keeps signs for one pair and takes the root mean square over several', () => {
    expect(Array.from(combinePairWeights({ rows: 1, cols: 2, data: Float64Array.of(-1, 2) }).values)).toEqual(
      [-1, 2],
    );
    const several = combinePairWeights({ rows: 2, cols: 2, data: Float64Array.of(3, 0, -4, 2) });
    expect(several.signed).toBe(false);
    expect(several.values[0]).toBeCloseTo(Math.sqrt(12.5), 12);
    expect(several.values[1]).toBeCloseTo(Math.sqrt(2), 12);
  });
});

describe('permutationImportance', () => {
  it('gives zero to groups the model ignores and a large drop to the group it uses', async () => {
    // Breiman, "Random forests", 2001: shuffling a feature the model does not use cannot change its
    // predictions, so its importance is exactly 0; shuffling the one it relies on drops accuracy toward chance.
    const groups = groupsByDegreeLayer(locations);
    expect(groups.map((g) => [g.name, g.columns])).toEqual([
      ['H0 λ1', [1]],
      ['H1 λ1', [0, 2]],
      ['H1 λ2', [4]],
      ['raw features', [3]],
    ]);
    const random = new Random(8);
    const rows = 200;
    const x: Matrix = { rows, cols: 5, data: new Float64Array(rows * 5) };
    const y = new Int32Array(rows);
    for (let i = 0; i < rows; i++) {
      y[i] = i % 2;
      for (let j = 0; j < 5; j++) x.data[i * 5 + j] = random.normal();
      x.data[i * 5 + 2] = y[i] === 1 ? 1 + random.uniform(0, 1) : -1 - random.uniform(0, 1);
    }
    // A fixed rule that reads only column 2 (group H1 λ1).
    const model = {
      async predictScores(m: Matrix): Promise<Matrix> {
        const data = new Float64Array(m.rows * 2);
        for (let i = 0; i < m.rows; i++) data[i * 2 + (m.data[i * m.cols + 2] > 0 ? 1 : 0)] = 1;
        return { rows: m.rows, cols: 2, data };
      },
    };
    const result = await permutationImportance(model, x, y, groups, { repeats: 4, seed: 3 });
    expect(result.baseline).toBe(1);
    const by = Object.fromEntries(result.groups.map((g) => [g.group, g]));
    expect(by['H0 λ1'].mean).toBe(0);
    expect(by['H1 λ2'].mean).toBe(0);
    expect(by['raw features'].mean).toBe(0);
    // Shuffled labels of a balanced two-class set are right about half the time: a drop near 0.5.
    expect(by['H1 λ1'].mean).toBeGreaterThan(0.35);
    expect(by['H1 λ1'].mean).toBeLessThan(0.65);
  });
});
