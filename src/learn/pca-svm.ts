import { UserError } from '../core/errors.js';
import type { Matrix } from '../core/matrix.js';
import type { Classifier, Hyperparameters } from './classifier.js';
import { Pca } from './pca.js';
import type { ProjectionCache } from './projection-cache.js';
import { StandardScaler } from './scaler.js';
import { type SvmKernel, SvmModel } from './svm.js';

/**
 * The `pca-svm` classifier: StandardScaler → Pca → SvmModel.
 * Hyperparameters: kernel ('linear' | 'rbf', default 'rbf'), C (default 1), gamma (RBF; default
 * 1 / input features — after standardising, the kept components carry about that total variance, so the
 * same scale applies), components (default: by varianceKept), varianceKept (default 0.95).
 */
export class PcaSvmClassifier implements Classifier {
  readonly name = 'pca-svm' as const;
  readonly hyperparameters: Hyperparameters;
  readonly seed: number;
  state:
    | { scaler: StandardScaler; pca: Pca; svm: SvmModel; features: number; classCount: number }
    | undefined;

  /** Fitted scaler + PCA shared with the other candidates of a search (see ProjectionCache); not saved. */
  private readonly shared: ProjectionCache | undefined;

  constructor(hyperparameters: Hyperparameters, seed: number, shared?: ProjectionCache) {
    for (const key of Object.keys(hyperparameters)) {
      if (!['kernel', 'C', 'gamma', 'components', 'varianceKept'].includes(key)) {
        throw new UserError(
          `pca-svm has no hyperparameter '${key}': use kernel, C, gamma, components or varianceKept`,
        );
      }
    }
    this.hyperparameters = { ...hyperparameters };
    this.seed = seed;
    this.shared = shared;
    // Build once so that a bad value fails here, before any training.
    this.makeParts();
  }

  async fit(x: Matrix, y: Int32Array, classCount: number): Promise<void> {
    const parts = this.makeParts();
    const fitParts = () => {
      const standardised = parts.scaler.fitTransform(x);
      return { scaler: parts.scaler, pca: parts.pca, scores: parts.pca.fitTransform(standardised) };
    };
    // The scaler and PCA do not depend on the SVM's settings: candidates of one fold share one fit.
    const { scaler, pca, scores } = this.shared
      ? this.shared.fit(x, JSON.stringify(parts.pca.options), fitParts)
      : fitParts();
    await parts.svm.fit(scores, y, classCount);
    this.state = { scaler, pca, svm: parts.svm, features: x.cols, classCount };
  }

  async predictScores(x: Matrix): Promise<Matrix> {
    const s = this.fitted();
    return s.svm.predictScores(this.project(s, x));
  }

  /** Class indices by libsvm's one-vs-one vote (without the probability step). */
  predictLabels(x: Matrix): Int32Array {
    const s = this.fitted();
    return s.svm.predictLabels(this.project(s, x));
  }

  private project(s: NonNullable<PcaSvmClassifier['state']>, x: Matrix): Matrix {
    return this.shared ? this.shared.project(x, s) : s.pca.transform(s.scaler.transform(x));
  }

  /**
   * For a linear kernel, each one-vs-one pair's decision written on the input features: f(x) = w·x + b.
   * With the scaler's mean m and scale σ, the PCA mean μ and loadings L (k × d), and the SVM's weight v
   * (on the k scores) and offset c, f(x) = v·L((x − m)/σ − μ) + c, so
   *   u = Lᵀ v,   w_j = u_j / σ_j,   b = c − Σ_j w_j m_j − u·μ.
   * Positive f favours the pair's first class. Undefined for the RBF kernel.
   */
  linearWeights(): { pairs: Array<[number, number]>; weights: Matrix; bias: Float64Array } | undefined {
    const s = this.fitted();
    const inner = s.svm.linearWeights();
    if (!inner) return undefined;
    const pcaState = s.pca.state;
    const scalerState = s.scaler.state;
    if (!pcaState || !scalerState) return undefined;
    const k = pcaState.loadings.rows;
    const d = pcaState.loadings.cols;
    const L = pcaState.loadings.data;
    const pairCount = inner.weights.rows;
    const weights = new Float64Array(pairCount * d);
    const bias = new Float64Array(pairCount);
    const u = new Float64Array(d);
    for (let p = 0; p < pairCount; p++) {
      u.fill(0);
      // Invariant: u = Σ_c v_c L_c over the components c visited so far.
      for (let c = 0; c < k; c++) {
        const v = inner.weights.data[p * k + c];
        for (let j = 0; j < d; j++) u[j] += v * L[c * d + j];
      }
      let b = inner.bias[p];
      for (let j = 0; j < d; j++) {
        const w = u[j] / scalerState.scale[j];
        weights[p * d + j] = w;
        b -= w * scalerState.mean[j] + u[j] * pcaState.mean[j];
      }
      bias[p] = b;
    }
    return { pairs: inner.pairs, weights: { rows: pairCount, cols: d, data: weights }, bias };
  }

  /** The fitted parts, for inspection (chosen components, explained variance, support vectors). */
  parts(): { scaler: StandardScaler; pca: Pca; svm: SvmModel } {
    const s = this.fitted();
    return { scaler: s.scaler, pca: s.pca, svm: s.svm };
  }

  async toJSON(): Promise<PcaSvmJSON> {
    const s = this.fitted();
    return {
      kind: 'landform.classifier',
      model: 'pca-svm',
      format: 1,
      hyperparameters: { ...this.hyperparameters },
      seed: this.seed,
      features: s.features,
      classCount: s.classCount,
      scaler: s.scaler.toJSON(),
      pca: s.pca.toJSON(),
      svm: s.svm.toJSON(),
    };
  }

  static fromJSON(json: unknown): PcaSvmClassifier {
    const j = json as Partial<PcaSvmJSON> | null;
    if (j?.kind !== 'landform.classifier' || j.model !== 'pca-svm')
      throw new UserError('not a saved pca-svm classifier: save the model again with this version');
    if (j.format !== 1)
      throw new UserError(
        `saved pca-svm classifier has format ${String(j.format)}, this version reads format 1: train and save the model again`,
      );
    const out = new PcaSvmClassifier(j.hyperparameters ?? {}, j.seed ?? 1);
    out.state = {
      scaler: StandardScaler.fromJSON(j.scaler),
      pca: Pca.fromJSON(j.pca),
      svm: SvmModel.fromJSON(j.svm),
      features: j.features ?? 0,
      classCount: j.classCount ?? 0,
    };
    return out;
  }

  dispose(): void {
    // Nothing native outlives fit (the libsvm model is read out and freed there).
    this.state = undefined;
  }

  private makeParts(): { scaler: StandardScaler; pca: Pca; svm: SvmModel } {
    const h = this.hyperparameters;
    const kernel = (h.kernel ?? 'rbf') as SvmKernel;
    if (kernel !== 'linear' && kernel !== 'rbf')
      throw new UserError(`pca-svm kernel must be linear or rbf, got '${String(h.kernel)}'`);
    const num = (key: string): number | undefined => {
      const v = h[key];
      if (v === undefined) return undefined;
      const n = typeof v === 'number' ? v : Number(v);
      if (!Number.isFinite(n)) throw new UserError(`pca-svm ${key} must be a number, got '${String(v)}'`);
      return n;
    };
    const components = num('components');
    const varianceKept = num('varianceKept');
    const gamma = num('gamma');
    return {
      scaler: new StandardScaler(),
      pca: new Pca({
        ...(components === undefined ? {} : { components }),
        ...(varianceKept === undefined ? {} : { varianceKept }),
      }),
      svm: new SvmModel({
        kernel,
        C: num('C') ?? 1,
        ...(gamma === undefined ? {} : { gamma }),
        seed: this.seed,
      }),
    };
  }

  private fitted(): NonNullable<PcaSvmClassifier['state']> {
    if (!this.state) throw new Error('pca-svm: call fit before predicting');
    return this.state;
  }
}

export interface PcaSvmJSON {
  kind: 'landform.classifier';
  model: 'pca-svm';
  format: 1;
  hyperparameters: Hyperparameters;
  seed: number;
  features: number;
  classCount: number;
  scaler: unknown;
  pca: unknown;
  svm: unknown;
}
