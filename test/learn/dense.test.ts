import { describe, expect, it } from 'vitest';
import type { Matrix } from '../../src/core/matrix.js';
import { Random } from '../../src/core/random.js';
import { DenseClassifier, DenseNetwork } from '../../src/learn/dense.js';
import { classifierFromJSON, createClassifier } from '../../src/learn/models.js';
import { loadTf } from '../../src/learn/tf-backend.js';

/** Two concentric rings in the plane, labelled inner 0 / outer 1: not linearly separable. */
function rings(n: number, seed: number): { x: Matrix; y: Int32Array } {
  const random = new Random(seed);
  const data = new Float64Array(n * 2);
  const y = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    y[i] = i % 2;
    const r = (y[i] === 0 ? 1 : 2.5) + random.normal(0, 0.2);
    const a = random.uniform(0, 2 * Math.PI);
    data[i * 2] = r * Math.cos(a);
    data[i * 2 + 1] = r * Math.sin(a);
  }
  return { x: { rows: n, cols: 2, data }, y };
}

function accuracy(scores: Matrix, y: Int32Array): number {
  let correct = 0;
  for (let r = 0; r < scores.rows; r++) {
    let best = 0;
    for (let c = 1; c < scores.cols; c++)
      if (scores.data[r * scores.cols + c] > scores.data[r * scores.cols + best]) best = c;
    if (best === y[r]) correct++;
  }
  return correct / scores.rows;
}

describe('dense network', () => {
  it('learns concentric rings, a problem no linear rule solves, on held-out rows', async () => {
    // Rings of radius 1 and 2.5 with noise 0.2 are separable by radius; a linear classifier scores near
    // chance (the classes share their mean). A one-hidden-layer ReLU network can approximate the radial
    // boundary (Cybenko, "Approximation by superpositions of a sigmoidal function", 1989). The 0.9 floor is
    // common practice, no source.
    const train = rings(160, 1);
    const test = rings(200, 2);
    const model = createClassifier('dense', { hidden: 16, epochs: 60 }, 4);
    await model.fit(train.x, train.y, 2);
    expect(accuracy(await model.predictScores(test.x), test.y)).toBeGreaterThan(0.9);
    model.dispose();
  });

  it('is reproducible for a seed, round-trips through save/load, and leaks no tensors', async () => {
    const { tf } = await loadTf();
    const { x, y } = rings(80, 3);
    const before = tf.memory().numTensors;
    const a = new DenseClassifier({ hidden: 8, epochs: 20 }, 7);
    const b = new DenseClassifier({ hidden: 8, epochs: 20 }, 7);
    await a.fit(x, y, 2);
    await b.fit(x, y, 2);
    const sa = await a.predictScores(x);
    expect(Array.from((await b.predictScores(x)).data)).toEqual(Array.from(sa.data));
    for (let r = 0; r < sa.rows; r++) expect(sa.data[2 * r] + sa.data[2 * r + 1]).toBeCloseTo(1, 5);
    const c = new DenseClassifier({ hidden: 8, epochs: 20 }, 8);
    await c.fit(x, y, 2);
    expect(Array.from((await c.predictScores(x)).data)).not.toEqual(Array.from(sa.data));

    const saved = JSON.parse(JSON.stringify(await a.toJSON()));
    const again = await classifierFromJSON(saved);
    expect(again.name).toBe('dense');
    expect(Array.from((await again.predictScores(x)).data)).toEqual(Array.from(sa.data));

    for (const m of [a, b, c, again]) m.dispose();
    a.dispose(); // safe twice
    expect(tf.memory().numTensors).toBe(before);

    // No growth across folds: fit, predict and dispose again and again.
    for (let fold = 0; fold < 3; fold++) {
      const m = new DenseClassifier({ hidden: 4, epochs: 5 }, fold);
      await m.fit(x, y, 2);
      await m.predictScores(x);
      m.dispose();
    }
    expect(tf.memory().numTensors).toBe(before);
  });

  it('dropout changes training and stays reproducible for a seed', async () => {
    // Dropout (Srivastava et al., "Dropout: a simple way to prevent neural networks from overfitting", 2014),
    // with its per-step seeds drawn from the run's Random: same seed, same result; not a no-op.
    const { x, y } = rings(80, 6);
    const run = async (dropout: number): Promise<number[]> => {
      const m = new DenseClassifier({ hidden: 16, epochs: 15, dropout }, 3);
      await m.fit(x, y, 2);
      const out = Array.from((await m.predictScores(x)).data);
      m.dispose();
      return out;
    };
    const a = await run(0.3);
    expect(await run(0.3)).toEqual(a);
    expect(a).not.toEqual(await run(0));
  });

  it('stops early on the validation split and keeps the best epoch', async () => {
    // Labels drawn at random: nothing generalises, so the validation loss soon stops falling.
    const { x } = rings(100, 5);
    const random = new Random(9);
    const y = Int32Array.from({ length: 100 }, () => random.int(2));
    const net = new DenseNetwork({ hidden: 32, epochs: 400, patience: 5, seed: 2 });
    await net.fit(x, y, 2);
    const s = net.state;
    if (!s) throw new Error('not fitted');
    expect(s.epochsRun).toBeLessThan(400);
    expect(s.epochsRun - s.bestEpoch).toBe(5);
    net.dispose();
  });

  it('rejects bad hyperparameters and foreign JSON with a clear message', async () => {
    expect(() => new DenseClassifier({ hidden: 0 }, 1)).toThrow(/hidden units must be a whole number ≥ 1/);
    expect(() => new DenseClassifier({ kernel: 'rbf' }, 1)).toThrow(/no hyperparameter 'kernel'/);
    await expect(DenseNetwork.fromJSON({ kind: 'landform.dense', format: 3 })).rejects.toThrow(/format 3/);
  });
});
