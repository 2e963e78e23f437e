import type { Matrix } from '../src/core/matrix.js';
import { Random } from '../src/core/random.js';
import { DenseNetwork } from '../src/learn/dense.js';
import { loadLibsvm } from '../src/learn/libsvm.js';
import { createClassifier } from '../src/learn/models.js';
import { StandardScaler } from '../src/learn/scaler.js';
import { SvmModel } from '../src/learn/svm.js';
import { loadTf, useBackend } from '../src/learn/tf-backend.js';
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

/** libsvm alone (no probability calibration, native prediction): the baseline of the pca-svm figures. */
async function nativeSvm(x: Matrix, y: Int32Array): Promise<{ fitMs: number; predictMs: number }> {
  const Svm = await loadLibsvm();
  const rows = Array.from({ length: x.rows }, (_, i) => x.data.subarray(i * x.cols, (i + 1) * x.cols));
  let svm = new Svm({
    type: Svm.SVM_TYPES.C_SVC,
    kernel: Svm.KERNEL_TYPES.RBF,
    cost: 10,
    gamma: 1 / x.cols,
    quiet: true,
  });
  const fit = await time(
    () => {
      svm.free();
      svm = new Svm({
        type: Svm.SVM_TYPES.C_SVC,
        kernel: Svm.KERNEL_TYPES.RBF,
        cost: 10,
        gamma: 1 / x.cols,
        quiet: true,
      });
      svm.train(rows, y);
    },
    3,
    1,
  );
  const predict = await time(() => {
    for (const r of rows) svm.predictOne(r);
  }, 3);
  svm.free();
  return { fitMs: fit.ms, predictMs: predict.ms };
}

export async function run(): Promise<void> {
  const sizes: Array<[number, number]> = [
    [120, 50],
    [300, 200],
    [600, 500],
  ];
  const svmFigures: Figure[] = [];
  for (const [n, d] of sizes) {
    const { x, y } = blobs(n, d, n + d);
    const model = createClassifier('pca-svm', { kernel: 'rbf', C: 10, varianceKept: 0.95 }, 1);
    const fit = await time(() => model.fit(x, y, 3), 3, 1);
    const predict = await time(() => model.predictScores(x), 3, 1);
    // The SVM inside sees the PCA scores; the native baseline sees the same scores.
    const scaler = new StandardScaler().fit(x);
    const inner = createClassifier('pca-svm', { kernel: 'rbf', C: 10 }, 1) as unknown as {
      fit: typeof model.fit;
      parts(): { pca: { transform(m: Matrix): Matrix } };
    };
    await inner.fit(x, y, 3);
    const scores = inner.parts().pca.transform(scaler.transform(x));
    const native = await nativeSvm(scores, y);
    const svmOnly = await time(
      () => new SvmModel({ kernel: 'rbf', C: 10, gamma: 1 / scores.cols }).fit(scores, y, 3),
      3,
      1,
    );
    svmFigures.push(
      { name: `pca-svm fit (scaler + PCA + SVM), ${n}×${d}`, value: fit.ms, unit: 'ms' },
      { name: `  SVM part alone on the ${scores.cols} PCA scores`, value: svmOnly.ms, unit: 'ms' },
      {
        name: `  ratio SVM part / libsvm training alone (cost of 5-fold calibration)`,
        value: svmOnly.ms / native.fitMs,
        unit: '×',
      },
      { name: `pca-svm predict scores, ${n}×${d}`, value: (n / predict.ms) * 1000, unit: 'rows/s' },
      {
        name: `  ratio of time to libsvm's native label prediction`,
        value: predict.ms / native.predictMs,
        unit: '×',
      },
    );
    model.dispose();
  }
  report('models: standardise + PCA + SVM (libsvm, WebAssembly build)', svmFigures);

  const runtime = await loadTf();
  const started = runtime.backend;
  const startNote = runtime.note;
  const denseFigures: Figure[] = [];
  const backends: Array<'wasm' | 'cpu'> = ['wasm', 'cpu'];
  for (const [n, d] of sizes.slice(0, 2)) {
    const { x, y } = blobs(n, d, 7 * n + d);
    const z = new StandardScaler().fitTransform(x);
    const per: Record<string, { fit: number; predict: number }> = {};
    for (const backend of backends) {
      if (!(await useBackend(backend))) continue;
      // A fixed 30 epochs (no early stop) so that both backends do the same work.
      const fit = await time(
        async () => {
          const net = await new DenseNetwork({ hidden: 32, epochs: 30, patience: 1000 }).fit(z, y, 3);
          net.dispose();
        },
        3,
        1,
      );
      const net = await new DenseNetwork({ hidden: 32, epochs: 30, patience: 1000 }).fit(z, y, 3);
      const predict = await time(() => net.predictScores(z), 5, 1);
      net.dispose();
      per[backend] = { fit: fit.ms, predict: predict.ms };
      denseFigures.push(
        { name: `dense fit 30 epochs (${backend}), ${n}×${d}`, value: fit.ms, unit: 'ms' },
        { name: `dense predict (${backend}), ${n}×${d}`, value: (n / predict.ms) * 1000, unit: 'rows/s' },
      );
    }
    if (per.wasm && per.cpu) {
      denseFigures.push(
        {
          name: `  wasm speed-up over the cpu backend (fit), ${n}×${d}`,
          value: per.cpu.fit / per.wasm.fit,
          unit: '×',
        },
        {
          name: `  wasm speed-up over the cpu backend (predict), ${n}×${d}`,
          value: per.cpu.predict / per.wasm.predict,
          unit: '×',
        },
      );
    }
  }
  await useBackend(started === 'cpu' ? 'cpu' : 'wasm');
  report(
    `models: dense network (TensorFlow.js; started on ${started}${startNote ? `: ${startNote}` : ''})`,
    denseFigures,
  );
}
