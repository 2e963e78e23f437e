import { EVD, Matrix as MlMatrix } from 'ml-matrix';
import { PCA as MlPca } from 'ml-pca';
import { UserError } from '../core/errors.js';
import type { Matrix } from '../core/matrix.js';

/** Hyperparameters of the principal component analysis. */
export interface PcaOptions {
  /** Keep exactly this many components (capped at the feature count). Default: chosen by `varianceKept`. */
  components?: number;
  /** Without `components`: keep the fewest leading components whose explained variance reaches this share. Default 0.95. */
  varianceKept?: number;
}

/** What `fit` learned. */
export interface PcaState {
  /** Column means of the training rows (the centre of the projection). */
  mean: Float64Array;
  /** k × d loadings, row c is component c (unit length, largest-magnitude entry positive). */
  loadings: Matrix;
  /** Share of the total variance of every component (all d, descending), summing to 1 (or all 0). */
  explained: Float64Array;
}

export interface PcaJSON {
  kind: 'landform.pca';
  format: 1;
  options: PcaOptions;
  mean: number[];
  components: number;
  features: number;
  loadings: number[];
  explained: number[];
}

/**
 * Principal component analysis on the sample covariance (divisor n − 1). With no more features than
 * samples (d ≤ n) it is ml-pca's eigendecomposition of the d × d covariance. With more features than
 * samples — usual for landscape vectors — the same components come from the n × n Gram matrix of the
 * centred rows, G = X̃X̃ᵀ/(n − 1): its nonzero eigenvalues are the covariance's, and each eigenvector u
 * gives the component v = X̃ᵀu / ‖X̃ᵀu‖ (the "snapshot" identity of Sirovich, "Turbulence and the dynamics
 * of coherent structures", 1987), at a cost of n³ instead of d³. Projection uses only the first k loadings: z = L (x − mean).
 * Component signs are fixed (largest-magnitude loading positive) so that a seed gives one answer.
 */
export class Pca {
  readonly options: PcaOptions;
  state: PcaState | undefined;

  constructor(options: PcaOptions = {}) {
    const varianceKept = options.varianceKept ?? 0.95;
    if (!(varianceKept > 0 && varianceKept <= 1))
      throw new UserError(`PCA variance kept must lie in (0, 1], got ${varianceKept}: give e.g. 0.95`);
    if (
      options.components !== undefined &&
      !(Number.isInteger(options.components) && options.components >= 1)
    ) {
      throw new UserError(`PCA component count must be a whole number ≥ 1, got ${options.components}`);
    }
    this.options =
      options.components === undefined ? { varianceKept } : { components: options.components, varianceKept };
  }

  fit(x: Matrix): this {
    if (x.rows < 2) throw new UserError('PCA needs at least two training samples: give more samples');
    const d = x.cols;
    const { mean, eigenvalues, vectors } = d <= x.rows ? covarianceRoute(x) : gramRoute(x);
    const values = eigenvalues.map((v) => Math.max(v, 0));
    const total = values.reduce((a, b) => a + b, 0);
    const explained = new Float64Array(d);
    for (let c = 0; c < values.length; c++) explained[c] = total > 0 ? values[c] / total : 0;
    const k = Math.min(this.chooseComponents(explained), vectors.length);
    const loadings = new Float64Array(k * d);
    for (let c = 0; c < k; c++) {
      const v = vectors[c];
      let big = 0;
      for (let j = 0; j < d; j++) if (Math.abs(v[j]) > Math.abs(big)) big = v[j];
      const sign = big < 0 ? -1 : 1;
      for (let j = 0; j < d; j++) loadings[c * d + j] = sign * v[j];
    }
    this.state = { mean, loadings: { rows: k, cols: d, data: loadings }, explained };
    return this;
  }

  /** Samples × k scores. */
  transform(x: Matrix): Matrix {
    const { mean, loadings } = this.fitted();
    const d = mean.length;
    if (x.cols !== d)
      throw new UserError(
        `PCA was fitted on ${d} features but got ${x.cols}: use vectors made the same way as the training vectors`,
      );
    const k = loadings.rows;
    const out = new Float64Array(x.rows * k);
    const centred = new Float64Array(d);
    const L = loadings.data;
    // Invariant: out holds the scores of rows 0..i-1; centred is scratch for row i.
    for (let i = 0; i < x.rows; i++) {
      const base = i * d;
      for (let j = 0; j < d; j++) centred[j] = x.data[base + j] - mean[j];
      for (let c = 0; c < k; c++) {
        let s = 0;
        const lb = c * d;
        for (let j = 0; j < d; j++) s += L[lb + j] * centred[j];
        out[i * k + c] = s;
      }
    }
    return { rows: x.rows, cols: k, data: out };
  }

  fitTransform(x: Matrix): Matrix {
    return this.fit(x).transform(x);
  }

  /** Share of variance of each kept component (length k). */
  explainedVariance(): Float64Array {
    const s = this.fitted();
    return s.explained.slice(0, s.loadings.rows);
  }

  /** Number of kept components. */
  components(): number {
    return this.fitted().loadings.rows;
  }

  toJSON(): PcaJSON {
    const s = this.fitted();
    return {
      kind: 'landform.pca',
      format: 1,
      options: { ...this.options },
      mean: Array.from(s.mean),
      components: s.loadings.rows,
      features: s.loadings.cols,
      loadings: Array.from(s.loadings.data),
      explained: Array.from(s.explained),
    };
  }

  static fromJSON(json: unknown): Pca {
    const j = json as Partial<PcaJSON> | null;
    if (j?.kind !== 'landform.pca')
      throw new UserError(
        'not a saved PCA (kind tag missing or different): save the model again with this version',
      );
    if (j.format !== 1)
      throw new UserError(
        `saved PCA has format ${String(j.format)}, this version reads format 1: save the model again with this version`,
      );
    const k = j.components ?? 0;
    const d = j.features ?? 0;
    if (
      !Array.isArray(j.mean) ||
      !Array.isArray(j.loadings) ||
      !Array.isArray(j.explained) ||
      j.mean.length !== d ||
      j.loadings.length !== k * d
    ) {
      throw new UserError('saved PCA is damaged (mean or loadings of the wrong size): save the model again');
    }
    const pca = new Pca(j.options ?? {});
    pca.state = {
      mean: Float64Array.from(j.mean),
      loadings: { rows: k, cols: d, data: Float64Array.from(j.loadings) },
      explained: Float64Array.from(j.explained),
    };
    return pca;
  }

  private chooseComponents(explained: Float64Array): number {
    const d = explained.length;
    if (this.options.components !== undefined) return Math.min(this.options.components, d);
    const goal = this.options.varianceKept ?? 0.95;
    if (explained[0] === 0 || d === 0) return Math.min(1, d); // no variance at all: one (zero) component
    let sum = 0;
    for (let c = 0; c < d; c++) {
      sum += explained[c];
      // A small slack so that 0.95 of exactly 0.95 counts as reached (common practice, no source).
      if (sum >= goal - 1e-12) return c + 1;
    }
    return Math.max(1, d);
  }

  private fitted(): PcaState {
    if (!this.state) throw new Error('Pca: call fit before transform');
    return this.state;
  }
}

interface Eigen {
  mean: Float64Array;
  /** Descending. */
  eigenvalues: number[];
  /** Unit eigenvectors (length d each), in the order of `eigenvalues`. */
  vectors: Float64Array[];
}

function toRows(x: Matrix): number[][] {
  const d = x.cols;
  const rows: number[][] = new Array(x.rows);
  for (let i = 0; i < x.rows; i++) rows[i] = Array.from(x.data.subarray(i * d, (i + 1) * d));
  return rows;
}

function covarianceRoute(x: Matrix): Eigen {
  const d = x.cols;
  const model = new MlPca(toRows(x), { method: 'covarianceMatrix', center: true, scale: false });
  const all = model.getLoadings(); // d × d, row c = component c
  const vectors: Float64Array[] = [];
  for (let c = 0; c < d; c++) vectors.push(Float64Array.from({ length: d }, (_, j) => all.get(c, j)));
  return { mean: Float64Array.from(model.toJSON().means), eigenvalues: model.getEigenvalues(), vectors };
}

function gramRoute(x: Matrix): Eigen {
  const n = x.rows;
  const d = x.cols;
  const mean = new Float64Array(d);
  for (let i = 0; i < n; i++) for (let j = 0; j < d; j++) mean[j] += x.data[i * d + j] / n;
  const centred = new Float64Array(n * d);
  for (let i = 0; i < n; i++) for (let j = 0; j < d; j++) centred[i * d + j] = x.data[i * d + j] - mean[j];
  const gram = new MlMatrix(n, n);
  // Invariant: gram holds (X̃X̃ᵀ)_{ab}/(n − 1) for every pair a ≤ b visited so far (mirrored).
  for (let a = 0; a < n; a++) {
    for (let b = a; b < n; b++) {
      let s = 0;
      for (let j = 0; j < d; j++) s += centred[a * d + j] * centred[b * d + j];
      gram.set(a, b, s / (n - 1));
      gram.set(b, a, s / (n - 1));
    }
  }
  const evd = new EVD(gram, { assumeSymmetric: true });
  const values = evd.realEigenvalues; // ascending
  const u = evd.eigenvectorMatrix;
  const eigenvalues: number[] = [];
  const vectors: Float64Array[] = [];
  for (let c = n - 1; c >= 0; c--) {
    const v = new Float64Array(d);
    for (let i = 0; i < n; i++) {
      const w = u.get(i, c);
      for (let j = 0; j < d; j++) v[j] += w * centred[i * d + j];
    }
    let norm = 0;
    for (let j = 0; j < d; j++) norm += v[j] * v[j];
    norm = Math.sqrt(norm);
    if (!(norm > 1e-7 * Math.sqrt(Math.max(0, values[n - 1]) * (n - 1)))) break; // the null space: no more components
    for (let j = 0; j < d; j++) v[j] /= norm;
    eigenvalues.push(values[c]);
    vectors.push(v);
  }
  if (vectors.length === 0) {
    const v = new Float64Array(d);
    if (d > 0) v[0] = 1;
    eigenvalues.push(0);
    vectors.push(v);
  }
  return { mean, eigenvalues, vectors };
}
