import type { Matrix } from '../src/core/matrix.js';
import { Random } from '../src/core/random.js';
import { createClassifier } from '../src/learn/models.js';
import { type Figure, report, time } from './harness.js';

/** Three Gaussian classes in d dimensions, class c shifted by 1.5 along axis c (a demo data shape). */
function blobs(n: number, d: number, seed: number): { x: Matrix; y: Int32Array } {
  const random = new Random(seed);
  const data = new Float64Array(n * d);
  const y = new Int32Array(n);
  for (let i = 0; i < n; i++) {
    y[i] = i % 3;
    for (let j = 0; j < d; j++) data[i * d + j] = random.normal() + (j === y[i] ? 1.5 : 0);
  }
  return { x: { rows: n, cols: d, data }, y };
}

export async function run(): Promise<void> {
  const figures: Figure[] = [];
  const sizes: Array<[number, number]> = [
    [120, 50],
    [300, 200],
    [600, 500],
    [1000, 2000],
  ];
  for (const [n, d] of sizes) {
    const { x, y } = blobs(n, d, n + d);
    const forest = createClassifier('forest', { trees: 100 }, 1);
    const fit = await time(() => forest.fit(x, y, 3), 3, 1);
    const predict = await time(() => forest.predictScores(x), 3, 1);
    // The default model beside it, as the scale of what a study already spends per fit.
    const svm = createClassifier('pca-svm', { kernel: 'rbf', C: 10 }, 1);
    const svmFit = await time(() => svm.fit(x, y, 3), 3, 1);
    figures.push(
      { name: `forest fit, 100 trees, ${n}×${d}`, value: fit.ms, unit: 'ms' },
      { name: `  pca-svm fit (RBF, C = 10), same data`, value: svmFit.ms, unit: 'ms' },
      { name: `forest predict scores, ${n}×${d}`, value: (n / predict.ms) * 1000, unit: 'rows/s' },
    );
    forest.dispose();
    svm.dispose();
  }
  report('models: random forest (our CART on typed arrays)', figures);
}
