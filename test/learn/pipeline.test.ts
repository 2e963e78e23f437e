import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runEvaluation } from '../../src/learn/evaluate.js';
import { loadModelFolder, saveModelFolder } from '../../src/learn/model-folder.js';
import { Pipeline } from '../../src/learn/pipeline.js';
import { tempDir } from '../helpers/cli.js';
import { irisDataset } from '../helpers/iris.js';

const iris = irisDataset;

describe('Pipeline and the study on Fisher’s Iris (outside data)', () => {
  // With all four standardised columns kept (components: 4), an RBF SVM is the textbook Iris classifier.
  const full = [1, 10, 100].flatMap((C) =>
    [0.1, 0.25, 1].map((gamma) => ({ kernel: 'rbf', C, gamma, components: 4 })),
  );

  it('cross-validated RBF SVM on the raw columns reaches ≥ 0.94 accuracy', async () => {
    // 0.96–0.97 is the usual cross-validated accuracy of an RBF SVM on Iris (from memory); the issue asks ≥ 0.94.
    const result = await runEvaluation(iris(), {
      models: ['pca-svm'],
      folds: 5,
      seed: 1,
      modelCandidates: { 'pca-svm': full },
    });
    expect(result.results).toHaveLength(1);
    expect(result.results[0].features).toBe('raw');
    expect(result.results[0].accuracy.mean).toBeGreaterThanOrEqual(0.94);
    expect(result.results[0].confusion.flat().reduce((a, b) => a + b, 0)).toBe(150);
  });

  it('fits on all samples, saves, loads and predicts the same scores', async () => {
    const data = iris();
    const pipeline = new Pipeline({ features: 'raw', model: 'pca-svm', seed: 3, modelCandidates: full });
    const ticks: string[] = [];
    await pipeline.fit(
      { samples: data.samples, columns: data.columns! },
      data.samples.map((s) => s.label),
      undefined,
      (phase, done, total) => ticks.push(`${phase} ${done}/${total}`),
    );
    // One tick per candidate scored by the inner CV, ending at its total, then the final fit.
    const tried = pipeline.state?.selection.tried.length ?? 0;
    expect(tried).toBeGreaterThan(1);
    expect(ticks.filter((t) => t.startsWith('inner CV'))).toHaveLength(tried);
    expect(ticks.slice(-3)).toEqual([`inner CV ${tried}/${tried}`, 'final fit 0/1', 'final fit 1/1']);
    const before = await pipeline.predict({ samples: data.samples });
    expect(before.classes).toEqual(['setosa', 'versicolor', 'virginica']);
    // Training-set agreement of a fitted SVM on Iris is high (common practice, no source).
    const agree = before.predicted.filter((p, i) => p === data.samples[i].label).length / data.samples.length;
    expect(agree).toBeGreaterThan(0.94);
    const dir = join(tempDir(), 'iris-pipeline');
    const { manifest, files } = await pipeline.toFolder({ kind: 'table' });
    await saveModelFolder(dir, { ...manifest }, files);
    const loaded = await loadModelFolder(dir);
    const again = await Pipeline.fromFolder(loaded.manifest, loaded.files, dir);
    expect(again.chosen()).toEqual(pipeline.chosen());
    const after = await again.predict({ samples: data.samples });
    expect(after.predicted).toEqual(before.predicted);
    for (let i = 0; i < before.scores.data.length; i++)
      expect(after.scores.data[i]).toBeCloseTo(before.scores.data[i], 10);
    await expect(
      Pipeline.fromFolder({ ...loaded.manifest, pipeline: { kind: 'other', format: 1 } }, loaded.files),
    ).rejects.toThrow(/holds no landform pipeline/);
    pipeline.dispose();
    again.dispose();
  });
});
